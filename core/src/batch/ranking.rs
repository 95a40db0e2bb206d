//! Ranking a sweep's isolators and judging each against no pad, per wind case.
//!
//! Calm and windy nights are ranked apart: wind usually dominates a windy case and hides what a
//! pad does to ground motion, so a mean over both would tell neither. Within a wind case the
//! isolators are ordered by their mean ratio of image RMS to no pad over the spectra.
//!
//! **Verdicts.** A pad's case differs visibly from no pad unless both stay below the
//! [`Visibility`] level (image RMS below 0.1 px and P(outside ½ px) below 1 % by default) or
//! the two differ by less than that level (|Δ RMS| < 0.1 px and |ΔP| < 1 %). A case that differs
//! visibly is "better" or "worse" by its ratio. Over its cases a pad is "better" (or "worse")
//! when no case goes the other way and one does this way, "no visible difference" when no case
//! is visible, and "mixed" otherwise. The level is a judgement of what an imager notices (common
//! practice, no source), adjustable in [`super::SweepConfig`].

use super::sweep_row::SweepRow;
use serde::Serialize;

/// When a difference in image motion counts as visible.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Visibility {
    /// Image RMS (px) below which motion is not seen, and the smallest visible change.
    pub rms_px: f64,
    /// P(outside ½ px) below which motion is not seen, and the smallest visible change.
    pub p_outside: f64,
}

impl Default for Visibility {
    /// 0.1 px RMS and 1 % (common practice, no source).
    fn default() -> Self {
        Visibility { rms_px: 0.1, p_outside: 0.01 }
    }
}

impl Visibility {
    /// Whether a rig's image motion is below the level (not seen at all).
    pub fn unseen(&self, rms_px: f64, p_outside: f64) -> bool {
        rms_px < self.rms_px && p_outside < self.p_outside
    }

    /// The verdict on one case of a pad against no pad (module docs).
    pub fn judge(&self, pad: (f64, f64), none: (f64, f64)) -> Verdict {
        let (rp, pp) = pad;
        let (rn, pn) = none;
        let small_change = (rp - rn).abs() < self.rms_px && (pp - pn).abs() < self.p_outside;
        if (self.unseen(rp, pp) && self.unseen(rn, pn)) || small_change {
            Verdict::NoVisibleDifference
        } else if rp > rn {
            Verdict::Worse
        } else {
            Verdict::Better
        }
    }
}

/// A pad against no pad.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Verdict {
    Better,
    NoVisibleDifference,
    Worse,
    /// Better in some cases, worse in others.
    Mixed,
}

impl Verdict {
    /// Plain words for tables.
    pub fn words(&self) -> &'static str {
        match self {
            Verdict::Better => "better",
            Verdict::NoVisibleDifference => "no visible difference",
            Verdict::Worse => "WORSE than no pad",
            Verdict::Mixed => "mixed",
        }
    }
}

/// One isolator's standing in a table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RankEntry {
    pub spec: String,
    /// Mean of `ratio_to_none` over the cases.
    pub mean_ratio: f64,
    pub mean_rms_px: f64,
    pub mean_p_outside_half_px: f64,
    pub cases: usize,
    /// Cases judged better, without visible difference, and worse than no pad.
    pub cases_better: usize,
    pub cases_same: usize,
    pub cases_worse: usize,
    pub verdict: Verdict,
    pub overloaded: bool,
    /// Worst gust peak (px) and longest ring-down (s) over the cases (NaN when calm).
    pub gust_peak_px: f64,
    pub gust_ringdown_s: f64,
}

/// A ranked table (best first: smallest mean ratio).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RankTable {
    /// The wind case.
    pub wind: String,
    /// A spectrum label, or "all spectra".
    pub spectrum: String,
    pub entries: Vec<RankEntry>,
}

impl RankTable {
    /// "wind calm, all spectra" and the like.
    pub fn scope(&self) -> String {
        format!("wind {}, {}", self.wind, self.spectrum)
    }
}

/// Ranked summary: per wind case over all spectra, and per wind case and spectrum.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SweepSummary {
    pub visibility: Visibility,
    pub per_wind: Vec<RankTable>,
    pub per_wind_spectrum: Vec<RankTable>,
    /// Error rows (key and message).
    pub failures: Vec<(String, String)>,
}

fn unique<'a>(it: impl Iterator<Item = &'a String>) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for s in it {
        if !out.contains(s) {
            out.push(s.clone());
        }
    }
    out
}

fn max_nan(v: impl Iterator<Item = f64>) -> f64 {
    v.filter(|x| !x.is_nan()).fold(f64::NAN, |a, b| if a.is_nan() { b } else { a.max(b) })
}

/// Rank the rows of one wind case (and maybe one spectrum); `all` holds every good row so each
/// case's no-pad row can be found.
fn rank(wind: &str, spectrum: &str, rows: &[&SweepRow], all: &[&SweepRow], vis: &Visibility) -> RankTable {
    let baseline = |r: &SweepRow| {
        all.iter().find(|b| b.spec == super::NO_PAD && b.spectrum == r.spectrum && b.wind == r.wind)
    };
    let entries = unique(rows.iter().map(|r| &r.spec))
        .into_iter()
        .filter_map(|s| {
            let mine: Vec<&&SweepRow> =
                rows.iter().filter(|r| r.spec == s && r.ratio_to_none.is_finite()).collect();
            if mine.is_empty() {
                return None;
            }
            let n = mine.len() as f64;
            let verdicts: Vec<Verdict> = mine
                .iter()
                .map(|r| match baseline(r) {
                    Some(b) => vis.judge((r.rms_px, r.p_outside_half_px), (b.rms_px, b.p_outside_half_px)),
                    None => Verdict::NoVisibleDifference,
                })
                .collect();
            let count = |v: Verdict| verdicts.iter().filter(|x| **x == v).count();
            let (better, same, worse) =
                (count(Verdict::Better), count(Verdict::NoVisibleDifference), count(Verdict::Worse));
            let verdict = match (better > 0, worse > 0) {
                (false, false) => Verdict::NoVisibleDifference,
                (true, false) => Verdict::Better,
                (false, true) => Verdict::Worse,
                (true, true) => Verdict::Mixed,
            };
            Some(RankEntry {
                mean_ratio: mine.iter().map(|r| r.ratio_to_none).sum::<f64>() / n,
                mean_rms_px: mine.iter().map(|r| r.rms_px).sum::<f64>() / n,
                mean_p_outside_half_px: mine.iter().map(|r| r.p_outside_half_px).sum::<f64>() / n,
                cases: mine.len(),
                cases_better: better,
                cases_same: same,
                cases_worse: worse,
                verdict,
                overloaded: mine.iter().any(|r| r.overloaded == Some(true)),
                gust_peak_px: max_nan(mine.iter().map(|r| r.gust_peak_px)),
                gust_ringdown_s: max_nan(mine.iter().map(|r| r.gust_ringdown_s)),
                spec: s,
            })
        })
        .collect::<Vec<_>>();
    let mut entries = entries;
    entries.sort_by(|a, b| a.mean_ratio.total_cmp(&b.mean_ratio).then_with(|| a.spec.cmp(&b.spec)));
    RankTable { wind: wind.into(), spectrum: spectrum.into(), entries }
}

/// Rank the isolators of a sweep's rows per wind case (over all spectra, and per spectrum).
pub fn summarize(rows: &[SweepRow], vis: &Visibility) -> SweepSummary {
    let good: Vec<&SweepRow> = rows.iter().filter(|r| !r.is_error()).collect();
    let winds = unique(good.iter().map(|r| &r.wind));
    let spectra = unique(good.iter().map(|r| &r.spectrum));
    let mut per_wind = Vec::new();
    let mut per_wind_spectrum = Vec::new();
    for w in &winds {
        let mine: Vec<&SweepRow> = good.iter().copied().filter(|r| &r.wind == w).collect();
        per_wind.push(rank(w, "all spectra", &mine, &good, vis));
        for s in &spectra {
            let these: Vec<&SweepRow> = mine.iter().copied().filter(|r| &r.spectrum == s).collect();
            if !these.is_empty() {
                per_wind_spectrum.push(rank(w, s, &these, &good, vis));
            }
        }
    }
    SweepSummary {
        visibility: *vis,
        per_wind,
        per_wind_spectrum,
        failures: rows.iter().filter_map(|r| r.error.as_ref().map(|e| (r.key.clone(), e.clone()))).collect(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(spec: &str, spectrum: &str, wind: &str, rms_px: f64, p: f64, ratio: f64) -> SweepRow {
        let mut r = SweepRow::failed(spec, spectrum, wind, String::new());
        r.error = None;
        (r.rms_px, r.p_outside_half_px, r.ratio_to_none) = (rms_px, p, ratio);
        r
    }

    #[test]
    fn a_thousandth_of_a_pixel_is_no_visible_difference() {
        let v = Visibility::default();
        assert_eq!(v.judge((0.002, 0.0), (0.001, 0.0)), Verdict::NoVisibleDifference);
        // A small change on a large motion is not visible either.
        assert_eq!(v.judge((1.25, 0.48), (1.22, 0.476)), Verdict::NoVisibleDifference);
        assert_eq!(v.judge((1.6, 0.49), (1.22, 0.476)), Verdict::Worse);
        assert_eq!(v.judge((0.05, 0.0), (0.4, 0.2)), Verdict::Better);
        // The thresholds are adjustable.
        let strict = Visibility { rms_px: 0.0005, p_outside: 0.01 };
        assert_eq!(strict.judge((0.002, 0.0), (0.001, 0.0)), Verdict::Worse);
    }

    #[test]
    fn calm_and_windy_are_ranked_apart() {
        let rows = vec![
            row("none", "site", "calm", 0.001, 0.0, 1.0),
            row("pad", "site", "calm", 0.003, 0.0, 3.0),
            row("none", "site", "4m/s", 2.0, 0.6, 1.0),
            row("pad", "site", "4m/s", 1.0, 0.4, 0.5),
        ];
        let s = summarize(&rows, &Visibility::default());
        assert_eq!(s.per_wind.len(), 2);
        let calm = &s.per_wind[0];
        assert_eq!(calm.wind, "calm");
        let pad = calm.entries.iter().find(|e| e.spec == "pad").unwrap();
        assert_eq!((pad.verdict, pad.cases_same), (Verdict::NoVisibleDifference, 1));
        let windy = &s.per_wind[1];
        assert_eq!(windy.entries[0].spec, "pad");
        assert_eq!(windy.entries[0].verdict, Verdict::Better);
        assert_eq!(s.per_wind_spectrum.len(), 2);
    }
}
