//! Multilinear (rational-form) sums over SIMD lanes, written with explicit SIMD vectors.
//!
//! For k changed quantities d_1 … d_k and coefficients c_S over all 2^k subsets S (bit p of the
//! subset index is quantity p), Σ_S d_S c_S with d_S = Π_{s∈S} d_s is evaluated nested one
//! quantity at a time (c_S + d_s c_{S∪s}, a tree of 2^k − 1 complex multiply-adds), and the same
//! nesting of the non-negative bounds b_S gives Σ_S |d_S| b_S, a bound on the rounding of the sum.
//! The variants engine ([`crate::frf::variants`]) divides such sums to get its FRFs.
//!
//! The compiler did not vectorise these sums across lanes by itself, so they are written on
//! SIMD vectors here. A caller gets them through [`with_rational_sums`], which compiles its loop
//! ([`RationalLoop`]) for the CPU's best instruction set and hands it a [`RationalSums`] for
//! that set.

use super::lanes::{CLane, LANES, Lane, LaneMask};

/// The rational-form sums for one instruction set (see [`with_rational_sums`]).
pub trait RationalSums: Copy {
    /// For one lane block with the K changes `d` (NS = 2^K): `c` holds [D_S | N_t,S] per subset
    /// (the denominator's coefficients, then each numerator t's) and `cb` their bounds; `y[t]`
    /// gets N_t/D for every numerator t. Returns the lanes where some sum's bound exceeds
    /// `bound_max` times its modulus |re| + |im|, or is not a number.
    fn quotients<const K: usize, const NS: usize>(
        self,
        d: &[CLane],
        c: &[CLane],
        cb: &[Lane],
        bound_max: f64,
        y: &mut [CLane],
    ) -> LaneMask;
}

/// A loop that evaluates rational-form sums, run by [`with_rational_sums`].
pub trait RationalLoop {
    type Output;
    /// The loop body; mark it `#[inline(always)]` so it is compiled for the chosen set.
    fn run<R: RationalSums>(self, sums: R) -> Self::Output;
}

/// Run `body` compiled for the best instruction set this CPU offers (chosen at run time, as
/// [`super::lanes::with_best_simd`]), with the rational-form sums for that set.
#[inline(always)]
pub fn with_rational_sums<L: RationalLoop>(body: L) -> L::Output {
    struct Op<L>(L);
    impl<L: RationalLoop> pulp::WithSimd for Op<L> {
        type Output = L::Output;
        #[inline(always)]
        fn with_simd<S: pulp::Simd>(self, simd: S) -> L::Output {
            self.0.run(SimdSums(simd))
        }
    }
    pulp::Arch::new().dispatch(Op(body))
}

/// [`RationalSums`] on the vectors of instruction set `S`.
#[derive(Clone, Copy)]
struct SimdSums<S>(S);

impl<S: pulp::Simd> RationalSums for SimdSums<S> {
    #[inline(always)]
    fn quotients<const K: usize, const NS: usize>(
        self,
        d: &[CLane],
        c: &[CLane],
        cb: &[Lane],
        bound_max: f64,
        y: &mut [CLane],
    ) -> LaneMask {
        pulp::WithSimd::with_simd(Quotients::<K, NS> { d: &d[..K], c, cb, bound_max, y }, self.0)
    }
}

/// The quotients of one lane block (see [`RationalSums::quotients`]).
struct Quotients<'a, const K: usize, const NS: usize> {
    d: &'a [CLane],
    c: &'a [CLane],
    cb: &'a [Lane],
    bound_max: f64,
    y: &'a mut [CLane],
}

impl<const K: usize, const NS: usize> pulp::WithSimd for Quotients<'_, K, NS> {
    type Output = LaneMask;

    #[inline(always)]
    fn with_simd<S: pulp::Simd>(self, simd: S) -> LaneMask {
        const { assert!(NS == 1 << K) };
        let Quotients { d, c, cb, bound_max, y } = self;
        let chunks = S::as_simd_f64s(&[0.0; LANES]).0.len();
        debug_assert_eq!(chunks * S::F64_LANES, LANES);
        let (zero, one) = (simd.splat_f64s(0.0), simd.splat_f64s(1.0));
        let (mut flags, mut any) = ([0.0; LANES], zero);
        for q in 0..chunks {
            // d_s and cabs1(d_s), which bounds |d_s|.
            let mut dv = [[zero; K]; 3];
            for p in 0..K {
                let (xr, xi) = (chunk::<S>(&d[p].re, q), chunk::<S>(&d[p].im, q));
                dv[0][p] = xr;
                dv[1][p] = xi;
                dv[2][p] = simd.add_f64s(simd.abs_f64s(xr), simd.abs_f64s(xi));
            }
            let mut ok = simd.less_than_or_equal_f64s(zero, zero);
            let (dr, di) = rational_sum::<S, K, NS>(simd, &dv, &c[..NS], &cb[..NS], q, bound_max, &mut ok);
            let rinv = simd.div_f64s(one, simd.mul_add_e_f64s(dr, dr, simd.mul_f64s(di, di)));
            let (ir, ii) = (simd.mul_f64s(dr, rinv), simd.neg_f64s(simd.mul_f64s(di, rinv)));
            for (t, yt) in y.iter_mut().enumerate() {
                let span = NS * (t + 1)..NS * (t + 2);
                let (nr, ni) =
                    rational_sum::<S, K, NS>(simd, &dv, &c[span.clone()], &cb[span], q, bound_max, &mut ok);
                S::as_mut_simd_f64s(&mut yt.re).0[q] =
                    simd.negate_mul_add_e_f64s(ni, ii, simd.mul_f64s(nr, ir));
                S::as_mut_simd_f64s(&mut yt.im).0[q] = simd.mul_add_e_f64s(nr, ii, simd.mul_f64s(ni, ir));
            }
            let flag = simd.select_f64s(ok, zero, one);
            S::as_mut_simd_f64s(&mut flags).0[q] = flag;
            any = simd.add_f64s(any, flag);
        }
        // Nearly every block passes: one horizontal sum decides whether to build the mask.
        let mut bad: LaneMask = 0;
        if simd.reduce_sum_f64s(any) != 0.0 {
            for (l, f) in flags.iter().enumerate() {
                bad |= ((*f != 0.0) as LaneMask) << l;
            }
        }
        bad
    }
}

/// SIMD chunk `q` of a lane array.
#[inline(always)]
fn chunk<S: pulp::Simd>(x: &Lane, q: usize) -> S::f64s {
    S::as_simd_f64s(x).0[q]
}

/// Σ_S d_S c_S over one chunk, nested one quantity at a time (c_S + d_s c_{S∪s}, a tree of
/// 2^k − 1 complex multiply-adds), with dv = [Re d_s, Im d_s, cabs1 d_s]; the same nesting of the
/// bounds gives Σ |d_S| b_S. Lanes where that exceeds `bound_max`·cabs1(sum), or is not a
/// number, clear `ok`.
#[inline(always)]
fn rational_sum<S: pulp::Simd, const K: usize, const NS: usize>(
    simd: S,
    dv: &[[S::f64s; K]; 3],
    c: &[CLane],
    cb: &[Lane],
    q: usize,
    bound_max: f64,
    ok: &mut S::m64s,
) -> (S::f64s, S::f64s) {
    let [dr, di, da] = dv;
    let zero = simd.splat_f64s(0.0);
    let (mut vr, mut vi, mut vb) = ([zero; NS], [zero; NS], [zero; NS]);
    for s in 0..NS {
        vr[s] = chunk::<S>(&c[s].re, q);
        vi[s] = chunk::<S>(&c[s].im, q);
        vb[s] = chunk::<S>(&cb[s], q);
    }
    // Bit p of the subset index is quantity p; each level folds the lowest remaining bit.
    let mut h = NS;
    for p in 0..K {
        h /= 2;
        for s in 0..h {
            let (ar, ai, br, bi) = (vr[2 * s], vi[2 * s], vr[2 * s + 1], vi[2 * s + 1]);
            vr[s] = simd.negate_mul_add_e_f64s(di[p], bi, simd.mul_add_e_f64s(dr[p], br, ar));
            vi[s] = simd.mul_add_e_f64s(di[p], br, simd.mul_add_e_f64s(dr[p], bi, ai));
            vb[s] = simd.mul_add_e_f64s(da[p], vb[2 * s + 1], vb[2 * s]);
        }
    }
    let a = simd.add_f64s(simd.abs_f64s(vr[0]), simd.abs_f64s(vi[0]));
    let fine = simd.less_than_or_equal_f64s(vb[0], simd.mul_f64s(simd.splat_f64s(bound_max), a));
    *ok = simd.and_m64s(*ok, fine);
    (vr[0], vi[0])
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    /// K = 2 changes, NS = 4 subsets, `y.len()` numerators.
    struct Quot2<'a> {
        d: &'a [CLane],
        c: &'a [CLane],
        cb: &'a [Lane],
        y: &'a mut [CLane],
    }

    impl RationalLoop for Quot2<'_> {
        type Output = LaneMask;
        #[inline(always)]
        fn run<R: RationalSums>(self, sums: R) -> LaneMask {
            sums.quotients::<2, 4>(self.d, self.c, self.cb, 1e4, self.y)
        }
    }

    fn cabs1(z: Complex64) -> f64 {
        z.re.abs() + z.im.abs()
    }

    #[test]
    fn quotients_match_direct_subset_sums_and_flag_cancellation() {
        // Oracle: Σ_S (Π_{s∈S} d_s) c_S summed subset by subset in scalar complex arithmetic.
        let z = |a: f64, b: f64| Complex64::new(a, b);
        let (mut d, mut c) = ([CLane::ZERO; 2], [CLane::ZERO; 12]);
        for l in 0..LANES {
            let x = l as f64;
            d[0].set(l, z(0.3 + 0.1 * x, -0.2));
            d[1].set(l, z(-0.5, 0.05 * x));
            for (s, cs) in c.iter_mut().enumerate() {
                // The empty subset dominates: no cancellation in these sums.
                let lead = if s % 4 == 0 { 3.0 } else { 0.0 };
                cs.set(l, z(lead + 0.1 * (s as f64 + 1.0), 0.02 * x - 0.03 * s as f64));
            }
        }
        // Lane 5: D = 1 + d_0·(−1/d_0) cancels to round-off; lane 6: a bound that is not a number.
        let d0 = d[0].get(5);
        c[0].set(5, z(1.0, 0.0));
        c[1].set(5, -1.0 / d0);
        c[2].set(5, z(0.0, 0.0));
        c[3].set(5, z(0.0, 0.0));
        let mut cb: Vec<Lane> = c.iter().map(|x| std::array::from_fn(|l| cabs1(x.get(l)))).collect();
        cb[7][6] = f64::NAN;
        let mut y = [CLane::ZERO; 2];
        let bad = with_rational_sums(Quot2 { d: &d, c: &c, cb: &cb, y: &mut y });
        assert_eq!(bad, (1 << 5) | (1 << 6));
        for l in (0..LANES).filter(|&l| l != 5) {
            let sum = |t: usize| {
                (0..4usize)
                    .map(|s| {
                        let ds: Complex64 =
                            (0..2).filter(|p| s & (1 << p) != 0).map(|p| d[p].get(l)).product();
                        ds * c[4 * t + s].get(l)
                    })
                    .sum::<Complex64>()
            };
            for t in 0..2 {
                let want = sum(t + 1) / sum(0);
                let got = y[t].get(l);
                assert!((got - want).norm() <= 1e-14 * want.norm(), "lane {l}, t {t}: {got} vs {want}");
            }
        }
    }
}
