//! Tonal disturbance lines: a machine, pump or fan near the rig shaking at one frequency.
//!
//! A line is an input of the model (a ground axis, a force or a moment on a body) with an RMS
//! amplitude at one frequency f0. It is carried through the FRF evaluated exactly at f0 (not on
//! an analysis grid), so a line contributes |H(f0)|² A² to the image mean square, where A is the
//! line's RMS amplitude in the input's own unit (m, rad, N, N·m). A sinusoid of peak amplitude
//! a has RMS a/√2: the amplitude given here is the RMS. Lines at different frequencies are
//! uncorrelated over a long exposure, so their mean squares add; two lines at the same frequency
//! are also added in power (phases unknown), which is the expected value over random phases.
//!
//! Ground velocity and acceleration amplitudes are turned into displacement at f0:
//! d = v / (2π f0) = a / (2π f0)².

use crate::error::{Error, Result, require_non_negative, require_positive};
use crate::model::{GROUND_INPUTS, GROUND_ROTATION_INPUTS, Model};
use crate::units::ARCSEC_PER_RAD;
use serde::Serialize;
use std::f64::consts::PI;

/// The unit of a line's RMS amplitude.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum ToneUnit {
    /// Ground displacement (m).
    Metre,
    /// Ground velocity (m/s).
    MetrePerSecond,
    /// Ground acceleration (m/s²).
    MetrePerSecondSquared,
    /// Ground rotation (rad).
    Radian,
    /// Force on a body (N).
    Newton,
    /// Moment on a body (N·m).
    NewtonMetre,
}

impl ToneUnit {
    /// Names: `m`, `m_s`, `m_s2`, `rad`, `N`, `N_m` (the N also lower case).
    pub fn parse(name: &str) -> Result<ToneUnit> {
        Ok(match name {
            "m" => ToneUnit::Metre,
            "m_s" => ToneUnit::MetrePerSecond,
            "m_s2" => ToneUnit::MetrePerSecondSquared,
            "rad" => ToneUnit::Radian,
            "N" | "n" => ToneUnit::Newton,
            "N_m" | "n_m" => ToneUnit::NewtonMetre,
            other => {
                return Err(Error::UnknownName {
                    kind: "tone unit".into(),
                    name: other.into(),
                    known:
                        "m, m_s, m_s2 (ground translation), rad (ground rotation), N (force), N_m (moment)"
                            .into(),
                });
            }
        })
    }

    /// The name [`ToneUnit::parse`] reads.
    pub fn name(self) -> &'static str {
        match self {
            ToneUnit::Metre => "m",
            ToneUnit::MetrePerSecond => "m_s",
            ToneUnit::MetrePerSecondSquared => "m_s2",
            ToneUnit::Radian => "rad",
            ToneUnit::Newton => "N",
            ToneUnit::NewtonMetre => "N_m",
        }
    }
}

/// What kind of input a line drives, by its name.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum InputKind {
    GroundTranslation,
    GroundRotation,
    Force,
    Moment,
}

fn input_kind(input: &str) -> Result<InputKind> {
    let base = input.split('@').next().unwrap_or(input);
    Ok(match base {
        b if GROUND_INPUTS.contains(&b) => InputKind::GroundTranslation,
        b if GROUND_ROTATION_INPUTS.contains(&b) => InputKind::GroundRotation,
        b if b.starts_with("force:") => InputKind::Force,
        b if b.starts_with("moment:") => InputKind::Moment,
        _ => {
            return Err(Error::UnknownName {
                kind: "tone input".into(),
                name: input.into(),
                known: "ground_x|y|z[@STATION], ground_rx|ry|rz, force:BODY:x|y|z[@X,Y,Z], moment:BODY:x|y|z"
                    .into(),
            });
        }
    })
}

/// One disturbance line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ToneLine {
    pub frequency_hz: f64,
    /// A model input: `ground_z`, `force:deck:z@1,0,0.1`, ...
    pub input: String,
    /// RMS amplitude in `unit` (a sinusoid of peak a has RMS a/√2).
    pub amplitude_rms: f64,
    pub unit: ToneUnit,
}

impl ToneLine {
    /// A checked line: f0 > 0, amplitude ≥ 0, and a unit that fits the input.
    pub fn new(frequency_hz: f64, input: &str, amplitude_rms: f64, unit: ToneUnit) -> Result<ToneLine> {
        require_positive("tone frequency_hz", frequency_hz)?;
        require_non_negative("tone amplitude_rms", amplitude_rms)?;
        let kind = input_kind(input)?;
        let fits = match kind {
            InputKind::GroundTranslation => {
                matches!(unit, ToneUnit::Metre | ToneUnit::MetrePerSecond | ToneUnit::MetrePerSecondSquared)
            }
            InputKind::GroundRotation => unit == ToneUnit::Radian,
            InputKind::Force => unit == ToneUnit::Newton,
            InputKind::Moment => unit == ToneUnit::NewtonMetre,
        };
        if !fits {
            return Err(Error::invalid(
                format!("tone unit for '{input}'"),
                format!(
                    "'{}' does not fit this input: ground_x|y|z take m, m_s or m_s2; ground_rx|ry|rz rad; force: N; moment: N_m",
                    unit.name()
                ),
            ));
        }
        Ok(ToneLine { frequency_hz, input: input.into(), amplitude_rms, unit })
    }

    /// Read `F:INPUT:AMPLITUDE:UNIT`, e.g. `24:ground_z:1e-6:m_s` or `50:force:deck:z@1,0,0.1:0.5:N`
    /// (the input may itself hold colons: the first field is the frequency, the last two the
    /// amplitude and unit).
    pub fn parse(text: &str) -> Result<ToneLine> {
        let bad = |why: &str| Error::Parse {
            file: "tone".into(),
            location: format!("'{text}'"),
            reason: format!("{why}; expected FREQ_HZ:INPUT:RMS_AMPLITUDE:UNIT, e.g. 24:ground_z:1e-6:m_s"),
        };
        let parts: Vec<&str> = text.split(':').collect();
        if parts.len() < 4 {
            return Err(bad("too few fields"));
        }
        let f: f64 = parts[0].trim().parse().map_err(|_| bad("the frequency is not a number"))?;
        let n = parts.len();
        let a: f64 = parts[n - 2].trim().parse().map_err(|_| bad("the amplitude is not a number"))?;
        let unit = ToneUnit::parse(parts[n - 1].trim())?;
        let input = parts[1..n - 2].join(":");
        ToneLine::new(f, input.trim(), a, unit)
    }

    /// True for a ground translation line (the kind that distance attenuation applies to).
    pub fn is_ground_translation(&self) -> bool {
        matches!(input_kind(&self.input), Ok(InputKind::GroundTranslation))
    }

    /// The RMS amplitude in the input's own unit (m, rad, N or N·m).
    pub fn input_amplitude_rms(&self) -> f64 {
        let w = 2.0 * PI * self.frequency_hz;
        match self.unit {
            ToneUnit::MetrePerSecond => self.amplitude_rms / w,
            ToneUnit::MetrePerSecondSquared => self.amplitude_rms / (w * w),
            _ => self.amplitude_rms,
        }
    }
}

/// The image motion of one line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ToneLineImage {
    pub line: ToneLine,
    /// RMS amplitude in the input's own unit (m, rad, N, N·m).
    pub input_amplitude_rms: f64,
    /// RMS along image_x and image_y (arcsec).
    pub image_rms_arcsec: [f64; 2],
    /// Radial RMS: arcsec, µm at the focal plane, px.
    pub rms_arcsec: f64,
    pub rms_um: f64,
    pub rms_px: f64,
    /// This line's share of the lines' total mean square.
    pub share: f64,
}

/// The image motion of a set of lines.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ToneImage {
    pub lines: Vec<ToneLineImage>,
    /// Radial RMS of all lines together (their mean squares added).
    pub rms_arcsec: f64,
    pub rms_um: f64,
    pub rms_px: f64,
}

/// Carry each line through the model's FRF at its own frequency to the image.
pub fn tone_image(model: &Model, lines: &[ToneLine]) -> Result<ToneImage> {
    if lines.is_empty() {
        return Err(Error::invalid("tones", "give at least one line"));
    }
    let op = model.optics().ok_or_else(|| {
        Error::invalid("tones", "the model has no [optics] section; image motion needs one")
    })?;
    let scale = op.plate_scale_arcsec_per_px();
    let um_per_rad = op.focal_length_mm * 1e3;
    let mut out = Vec::with_capacity(lines.len());
    for l in lines {
        let frf = model.frf(&[l.frequency_hz], &[l.input.as_str()], &["image_x", "image_y"])?;
        let hx = frf.series("image_x", &l.input)?[0];
        let hy = frf.series("image_y", &l.input)?[0];
        let a = l.input_amplitude_rms();
        let ix = hx.norm() * a;
        let iy = hy.norm() * a;
        let rad = ix.hypot(iy);
        out.push(ToneLineImage {
            line: l.clone(),
            input_amplitude_rms: a,
            image_rms_arcsec: [ix * ARCSEC_PER_RAD, iy * ARCSEC_PER_RAD],
            rms_arcsec: rad * ARCSEC_PER_RAD,
            rms_um: rad * um_per_rad,
            rms_px: rad * ARCSEC_PER_RAD / scale,
            share: 0.0,
        });
    }
    let ms: f64 = out.iter().map(|l| l.rms_arcsec.powi(2)).sum();
    for l in &mut out {
        l.share = if ms > 0.0 { l.rms_arcsec.powi(2) / ms } else { 0.0 };
    }
    let rms = ms.sqrt();
    Ok(ToneImage {
        lines: out,
        rms_arcsec: rms,
        rms_um: rms / ARCSEC_PER_RAD * um_per_rad,
        rms_px: rms / scale,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// One rotational DOF: a body (rx only, I about its CG) on a torsion spring k_t(1 + iη) to
    /// the ground. Ground rotation θ_g drives it: θ/θ_g = k_t(1+iη) / (k_t(1+iη) − I ω²) = T(ω).
    fn sdof(kt: f64, eta: f64, inertia: f64) -> Model {
        let text = format!(
            r#"
[[body]]
name = "arm"
mass_kg = 10
cg_m = [0, 0, 0]
inertia_kgm2 = [{inertia}, {inertia}, {inertia}]
dofs = ["rx"]
[[torsion_spring]]
name = "t"
from = "ground"
to = "arm"
axis = [1, 0, 0]
stiffness_nm_per_rad = {kt}
loss_factor = {eta}
[optics]
body = "arm"
focal_length_mm = 1000
pixel_um = 4
altitude_deg = 90
azimuth_deg = 0
"#
        );
        Model::from_toml_str(&text, "sdof").unwrap()
    }

    /// A body free in y and rx on two horizontal springs along y, below and above its CG at
    /// unequal levers: ground y motion rocks it (for the unit checks; no closed form needed).
    fn rocker() -> Model {
        let text = r#"
[[body]]
name = "arm"
mass_kg = 10
cg_m = [0, 0, 0.5]
inertia_kgm2 = [2.5, 2.5, 2.5]
dofs = ["y", "rx"]
[[spring]]
name = "s"
from = "ground"
to = "arm"
at_m = [0, 0, 0]
direction = [0, 1, 0]
stiffness_n_per_m = 4e5
loss_factor = 0.05
[[spring]]
name = "s2"
from = "ground"
to = "arm"
at_m = [0, 0, 1.5]
direction = [0, 1, 0]
stiffness_n_per_m = 1e5
loss_factor = 0.05
[optics]
body = "arm"
focal_length_mm = 1000
pixel_um = 4
altitude_deg = 90
azimuth_deg = 0
"#;
        Model::from_toml_str(text, "rocker").unwrap()
    }

    #[test]
    fn sdof_line_matches_the_closed_form_transmissibility() {
        // SDOF transmissibility with rate-independent (hysteretic) damping,
        // T = √(1 + η²) / √((1 − r²)² + η²) (Chopra, Dynamics of Structures, ch. 3).
        let (kt, eta, inertia) = (1.0e5, 0.08, 2.5);
        let model = sdof(kt, eta, inertia);
        let fn_hz = (kt / inertia).sqrt() / (2.0 * PI);
        let a = 2e-7; // rad RMS
        for f0 in [0.37 * fn_hz, fn_hz, 1.9 * fn_hz, 7.3] {
            let r = f0 / fn_hz;
            let t = (1.0 + eta * eta).sqrt() / ((1.0 - r * r).powi(2) + eta * eta).sqrt();
            let line = ToneLine::new(f0, "ground_rx", a, ToneUnit::Radian).unwrap();
            let img = tone_image(&model, &[line]).unwrap();
            let expect_rad = t * a;
            let got = img.rms_arcsec / ARCSEC_PER_RAD;
            assert!((got / expect_rad - 1.0).abs() < 1e-9, "f0 {f0}: {got} vs {expect_rad}");
            assert!((img.rms_um / (expect_rad * 1e6) - 1.0).abs() < 1e-9);
            assert!((img.rms_px / (img.rms_arcsec / (4.0 / 1000.0 * 206.264_806_247)) - 1.0).abs() < 1e-9);
        }
    }

    #[test]
    fn lines_add_in_power_and_shares_sum_to_one() {
        let model = sdof(1.0e5, 0.05, 2.5);
        let a = ToneLine::parse("24:ground_rx:1e-7:rad").unwrap();
        let b = ToneLine::parse("50:moment:arm:x:0.2:N_m").unwrap();
        let both = tone_image(&model, &[a.clone(), b.clone()]).unwrap();
        let ra = tone_image(&model, &[a]).unwrap().rms_arcsec;
        let rb = tone_image(&model, &[b]).unwrap().rms_arcsec;
        assert!((both.rms_arcsec - ra.hypot(rb)).abs() < 1e-12 * both.rms_arcsec);
        let s: f64 = both.lines.iter().map(|l| l.share).sum();
        assert!((s - 1.0).abs() < 1e-12);
        assert!((both.lines[0].share - ra * ra / (ra * ra + rb * rb)).abs() < 1e-12);
        // A moment line on the SDOF: θ = M / (k_t(1+iη) − I ω²).
        let w = 2.0 * PI * 50.0;
        let kt = 1.0e5;
        let expect = 0.2 / ((kt - 2.5 * w * w).powi(2) + (kt * 0.05).powi(2)).sqrt();
        assert!((rb / ARCSEC_PER_RAD / expect - 1.0).abs() < 1e-9);
    }

    #[test]
    fn velocity_acceleration_and_displacement_agree() {
        let model = rocker();
        let w = 2.0 * PI * 13.0;
        let d =
            tone_image(&model, &[ToneLine::new(13.0, "ground_y", 1e-8, ToneUnit::Metre).unwrap()]).unwrap();
        assert!(d.rms_arcsec > 0.0);
        let v = tone_image(
            &model,
            &[ToneLine::new(13.0, "ground_y", 1e-8 * w, ToneUnit::MetrePerSecond).unwrap()],
        )
        .unwrap();
        let a = tone_image(
            &model,
            &[ToneLine::new(13.0, "ground_y", 1e-8 * w * w, ToneUnit::MetrePerSecondSquared).unwrap()],
        )
        .unwrap();
        assert!((d.rms_arcsec / v.rms_arcsec - 1.0).abs() < 1e-12);
        assert!((d.rms_arcsec / a.rms_arcsec - 1.0).abs() < 1e-12);
    }

    #[test]
    fn bad_lines_are_named_errors() {
        assert!(matches!(ToneLine::parse("24:ground_z:1e-6"), Err(Error::Parse { .. })));
        assert!(matches!(ToneLine::parse("x:ground_z:1e-6:m_s"), Err(Error::Parse { .. })));
        assert!(matches!(ToneLine::parse("24:ground_z:1e-6:furlong"), Err(Error::UnknownName { .. })));
        assert!(matches!(ToneLine::parse("24:ground_q:1e-6:m_s"), Err(Error::UnknownName { .. })));
        assert!(matches!(ToneLine::parse("24:ground_z:1e-6:N"), Err(Error::InvalidArgument { .. })));
        assert!(matches!(ToneLine::parse("-1:ground_z:1e-6:m_s"), Err(Error::InvalidArgument { .. })));
        assert!(matches!(ToneLine::parse("5:force:arm:z:-1:N"), Err(Error::InvalidArgument { .. })));
        let model = sdof(1.0e5, 0.05, 2.5);
        // A body the model does not have: the model's own unknown-name error.
        let l = ToneLine::parse("5:force:nothing:z:1:N").unwrap();
        assert!(matches!(tone_image(&model, &[l]), Err(Error::UnknownName { .. })));
        assert!(tone_image(&model, &[]).is_err());
    }
}
