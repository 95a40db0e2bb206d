//! Rigid-body mass properties of the builders: a mass with its CG and inertia tensor, and the
//! parallel-axis combination of several.

pub(super) type V3 = [f64; 3];
pub(super) type M3 = [[f64; 3]; 3];

pub(super) fn add(a: V3, b: V3) -> V3 {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}
pub(super) fn scale(a: V3, s: f64) -> V3 {
    [a[0] * s, a[1] * s, a[2] * s]
}

/// A mass with its CG and inertia tensor about that CG.
#[derive(Debug, Clone, Copy)]
pub(super) struct Mass {
    pub(super) m: f64,
    pub(super) c: V3,
    pub(super) j: M3,
}

impl Mass {
    pub(super) fn point(m: f64, c: V3) -> Mass {
        Mass { m, c, j: [[0.0; 3]; 3] }
    }
}

/// Total mass, CG and inertia tensor about the common CG (parallel-axis theorem:
/// J = Σ [J_i + m_i (|d_i|² 1 − d_i d_iᵀ)], d_i = c_i − c).
pub(super) fn combine(parts: &[Mass]) -> Mass {
    let m: f64 = parts.iter().map(|p| p.m).sum();
    let c = scale(parts.iter().fold([0.0; 3], |acc, p| add(acc, scale(p.c, p.m))), 1.0 / m);
    let mut j = [[0.0; 3]; 3];
    for p in parts {
        let d = [p.c[0] - c[0], p.c[1] - c[1], p.c[2] - c[2]];
        let d2 = d[0] * d[0] + d[1] * d[1] + d[2] * d[2];
        for a in 0..3 {
            for b in 0..3 {
                let delta = if a == b { 1.0 } else { 0.0 };
                j[a][b] += p.j[a][b] + p.m * (d2 * delta - d[a] * d[b]);
            }
        }
    }
    Mass { m, c, j }
}

/// Positive definite by Sylvester's criterion (leading minors > 0).
pub(super) fn positive_definite(j: &M3) -> bool {
    let m1 = j[0][0];
    let m2 = j[0][0] * j[1][1] - j[0][1] * j[1][0];
    let m3 = j[0][0] * (j[1][1] * j[2][2] - j[1][2] * j[2][1])
        - j[0][1] * (j[1][0] * j[2][2] - j[1][2] * j[2][0])
        + j[0][2] * (j[1][0] * j[2][1] - j[1][1] * j[2][0]);
    let s = m1.abs().max(1e-300);
    m1 > 0.0 && m2 > 1e-12 * s * s && m3 > 1e-12 * s * s * s
}
