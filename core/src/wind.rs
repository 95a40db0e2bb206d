//! Wind: along-wind turbulence spectra, linearised drag force and air density.
//!
//! All spectra are one-sided per Hz for the longitudinal gust component u, normalised so that
//! ∫₀^∞ S_u df = σ_u² (docs/references.md#s6). The published forms are available unnormalised as
//! [`kaimal_1972`], [`kaimal_iec`], [`von_karman`] and [`davenport`]; [`WindSpec::velocity_psd`]
//! scales each shape analytically to the prescribed σ_u²:
//! - Kaimal (1972): ∫ 105 (z/U)(1 + 33 n z/U)^(−5/3) dn = 105·(1/33)·(3/2) = 4.7727, so the
//!   shape is divided by 4.7727 (i.e. u*² is replaced by σ_u²/4.7727);
//! - Kaimal as in IEC 61400-1: integrates to σ_u² exactly as published;
//! - von Kármán with the published constant 70.8: integral √(c/70.8)·σ_u² with the exact
//!   c = (2√π Γ(1/3)/Γ(5/6))² = 70.78012763…, so it is divided by √(c/70.8) = 0.99986;
//! - Davenport (1961): the normalised variant σ_u² (2/3)(L/U)² n / (1 + (nL/U)²)^(4/3), L = 1200 m.
//!
//! ```
//! use stillsky::FreqGrid;
//! use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};
//!
//! // 5 m/s at 2 m, 20 % turbulence; a 0.3 m × 0.6 m tube assembly with Cd = 1.2.
//! let wind = WindSpec::new(WindSpectrum::VonKarman, 5.0, 2.0, Turbulence::Intensity(0.2));
//! let grid = FreqGrid::log(1e-3, 100.0, 400)?;
//! let s_u = wind.velocity_psd(&grid)?;                     // (m/s)²/Hz
//! let s_f = wind.drag_force_psd(1.2, 0.18, &grid, None)?;  // N²/Hz
//! assert!((wind.mean_drag_force_n(1.2, 0.18)? - 3.3075).abs() < 1e-9);
//! assert!(s_f.rms() < wind.drag_force_std_n(1.2, 0.18)?);  // grid covers most, not all
//! # let _ = s_u;
//! # Ok::<(), stillsky::Error>(())
//! ```

use crate::error::{Error, Result, require_finite, require_positive};
use crate::grid::FreqGrid;
use crate::spectrum::{Psd, Quantity};

/// Air density at sea level in the ISA, 1.2250 kg/m³ (docs/references.md#s6-6).
pub const AIR_DENSITY_SEA_LEVEL_KG_M3: f64 = 1.225;

/// von Kármán's constant κ = 0.4 of the logarithmic wind profile (from memory: verify;
/// docs/references.md#s6-1).
pub const VON_KARMAN_CONSTANT: f64 = 0.4;

/// σ_u / u* in a neutral surface layer, 2.5 (docs/references.md#s6-1 quotes 2.4–2.5, from memory:
/// verify).
pub const SIGMA_U_OVER_U_STAR: f64 = 2.5;

/// Exact von Kármán constant (2√π Γ(1/3)/Γ(5/6))², evaluated with scipy.special.gamma
/// (docs/references.md#s6-3 gives 70.7801).
pub const VON_KARMAN_C_EXACT: f64 = 70.78012763381714;

/// Turbulence intensity σ_u/U used when neither an intensity nor a roughness length is given
/// (the command line, the sweep's wind cases and the Python `Wind`): 0.2, common practice for
/// open ground a couple of metres up, no source.
pub const DEFAULT_TURBULENCE_INTENSITY: f64 = 0.2;

/// Roughness length assumed when none is given, 0.05 m: terrain category II of EN 1991-1-4
/// (low vegetation such as grass, isolated obstacles; from memory: verify).
pub const DEFAULT_ROUGHNESS_LENGTH_M: f64 = 0.05;

/// The height below which the log profile is held constant, z_min of EN 1991-1-4:2005
/// table 4.1 for the terrain category nearest a roughness length (categories 0, I, II, III,
/// IV: z0 = 0.003, 0.01, 0.05, 0.3, 1.0 m; z_min = 1, 1, 2, 5, 10 m; from memory: verify).
pub fn log_profile_min_height_m(z0_m: f64) -> f64 {
    const TABLE: [(f64, f64); 5] = [(0.003, 1.0), (0.01, 1.0), (0.05, 2.0), (0.3, 5.0), (1.0, 10.0)];
    let (_, z_min) = TABLE
        .iter()
        .min_by(|a, b| (a.0 / z0_m).ln().abs().total_cmp(&(b.0 / z0_m).ln().abs()))
        .copied()
        .unwrap_or((0.05, 2.0));
    z_min
}

/// Davenport's length scale, 1200 m (docs/references.md#s6-4).
pub const DAVENPORT_LENGTH_M: f64 = 1200.0;

/// Kaimal et al. (1972) neutral along-wind spectrum, unnormalised (docs/references.md#s6-1):
/// n S_u / u*² = 105 f / (1 + 33 f)^(5/3), f = n z / U. Returns S_u in (m/s)²/Hz.
pub fn kaimal_1972(freq_hz: f64, u_star_m_s: f64, height_m: f64, mean_speed_m_s: f64) -> f64 {
    let t = height_m / mean_speed_m_s;
    u_star_m_s * u_star_m_s * 105.0 * t / (1.0 + 33.0 * freq_hz * t).powf(5.0 / 3.0)
}

/// Kaimal spectrum as in IEC 61400-1 (docs/references.md#s6-2):
/// S_u = 4 σ_u² (L_u/U) / (1 + 6 f L_u/U)^(5/3), in (m/s)²/Hz.
pub fn kaimal_iec(freq_hz: f64, sigma_u_m_s: f64, length_m: f64, mean_speed_m_s: f64) -> f64 {
    let t = length_m / mean_speed_m_s;
    4.0 * sigma_u_m_s * sigma_u_m_s * t / (1.0 + 6.0 * freq_hz * t).powf(5.0 / 3.0)
}

/// von Kármán longitudinal spectrum with the published constant 70.8 (docs/references.md#s6-3):
/// S_u = 4 σ_u² (L/U) / (1 + 70.8 (f L/U)²)^(5/6), in (m/s)²/Hz (integral 0.99986 σ_u²).
pub fn von_karman(freq_hz: f64, sigma_u_m_s: f64, length_m: f64, mean_speed_m_s: f64) -> f64 {
    let t = length_m / mean_speed_m_s;
    4.0 * sigma_u_m_s * sigma_u_m_s * t / (1.0 + 70.8 * (freq_hz * t).powi(2)).powf(5.0 / 6.0)
}

/// Davenport (1961) spectrum, unnormalised (docs/references.md#s6-4):
/// n S_u / (κ U10²) = 4 x² / (1 + x²)^(4/3), x = 1200 n / U10; integral 6 κ U10².
pub fn davenport(freq_hz: f64, surface_drag_kappa: f64, u10_m_s: f64) -> f64 {
    let x = DAVENPORT_LENGTH_M * freq_hz / u10_m_s;
    surface_drag_kappa * u10_m_s * u10_m_s * 4.0 * x * x / (freq_hz * (1.0 + x * x).powf(4.0 / 3.0))
}

/// Air density of the ISA troposphere at `altitude_m` (docs/references.md#s6-6; the ISA constants
/// are marked "from memory: verify" there): T = 288.15 − 0.0065 h, p = 101 325 (T/288.15)^5.25588,
/// ρ = p/(287.05287 T). Valid from −1000 to 11 000 m.
pub fn isa_air_density_kg_m3(altitude_m: f64) -> Result<f64> {
    if !altitude_m.is_finite() || !(-1000.0..=11_000.0).contains(&altitude_m) {
        return Err(Error::OutOfRange {
            what: "altitude_m".into(),
            value: altitude_m,
            min: -1000.0,
            max: 11_000.0,
        });
    }
    let t = 288.15 - 0.0065 * altitude_m;
    let p = 101_325.0 * (t / 288.15).powf(5.25588);
    Ok(p / (287.05287 * t))
}

/// Air density at a site's elevation and air temperature: the ISA pressure at `elevation_m`
/// (as [`isa_air_density_kg_m3`]) with the ideal gas law at the actual temperature,
/// ρ = p_ISA(h) / (287.05287 (T + 273.15)) (dry air). At the ISA temperature of that height it
/// is the ISA density.
pub fn air_density_kg_m3(elevation_m: f64, temperature_c: f64) -> Result<f64> {
    require_finite("temperature_c", temperature_c)?;
    if !(-80.0..=60.0).contains(&temperature_c) {
        return Err(Error::invalid(
            "temperature_c",
            format!("must lie in [-80, 60] °C, got {temperature_c}"),
        ));
    }
    let t_isa = 288.15 - 0.0065 * elevation_m;
    let p = isa_air_density_kg_m3(elevation_m)? * 287.05287 * t_isa;
    Ok(p / (287.05287 * (temperature_c + 273.15)))
}

/// Which along-wind spectrum shape to use.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum WindSpectrum {
    /// Kaimal et al. (1972), neutral surface layer (uses the height z).
    #[default]
    Kaimal,
    /// Kaimal form of IEC 61400-1 with L_u = 8.1 Λ, Λ = 0.7 min(z, 60 m).
    KaimalIec,
    /// von Kármán longitudinal, with the same length scale as [`WindSpectrum::KaimalIec`].
    VonKarman,
    /// Davenport (1961), height-independent, L = 1200 m; the mean speed is read as U10.
    Davenport,
}

impl WindSpectrum {
    const NAMES: [(&'static str, WindSpectrum); 4] = [
        ("kaimal", WindSpectrum::Kaimal),
        ("kaimal-iec", WindSpectrum::KaimalIec),
        ("von-karman", WindSpectrum::VonKarman),
        ("davenport", WindSpectrum::Davenport),
    ];

    /// Parse "kaimal", "kaimal-iec", "von-karman" or "davenport" (case-insensitive, '_' as '-').
    pub fn from_name(name: &str) -> Result<Self> {
        let n = name.trim().to_ascii_lowercase().replace('_', "-");
        Self::NAMES.iter().find(|(k, _)| *k == n).map(|(_, v)| *v).ok_or_else(|| Error::UnknownName {
            kind: "wind spectrum".into(),
            name: name.to_string(),
            known: Self::NAMES.map(|(k, _)| k).join(", "),
        })
    }
}

/// How the turbulence level is given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Turbulence {
    /// Aerodynamic roughness length z0 (m). With the log profile u* = κU/ln(z/z0) and
    /// σ_u = 2.5 u*, the intensity is I_u = 2.5·0.4/ln(z/z0) = 1/ln(z/z0) (both constants from
    /// memory: verify). Requires z > e·z0 so that I_u < 1.
    RoughnessLength {
        /// z0 (m), > 0.
        z0_m: f64,
    },
    /// Turbulence intensity I_u = σ_u / U, in (0, 1].
    Intensity(f64),
}

/// Wind at the height of interest and the air it moves.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct WindSpec {
    /// Spectrum shape.
    pub kind: WindSpectrum,
    /// Mean speed U at `height_m` before sheltering (m/s), > 0.
    pub mean_speed_m_s: f64,
    /// Height above ground z (m), > 0.
    pub height_m: f64,
    /// Turbulence level.
    pub turbulence: Turbulence,
    /// Factor in (0, 1] on the mean speed for a sheltered site (default 1). The intensity is
    /// kept, so σ_u scales with it too.
    pub shelter_factor: f64,
    /// Air density ρ (kg/m³), default 1.225 (ISA sea level).
    pub air_density_kg_m3: f64,
    /// Apply the aerodynamic admittance of a compact body ([`vickery_admittance_sq`]) to the
    /// drag at a model's `[wind]` load (default true); false gives the quasi-steady drag.
    pub admittance: bool,
}

/// Aerodynamic admittance of a compact body of frontal area A in a gusty flow, Vickery's (1965)
/// form as quoted by Holmes (docs/references.md#s6-7):
/// |χ(n)|² = 1 / [1 + (2 n √A / U)^{4/3}]². It tends to 1 (quasi-steady) for gusts much larger
/// than the body and falls as n^{−8/3} for gusts much smaller.
pub fn vickery_admittance_sq(freq_hz: f64, area_m2: f64, mean_speed_m_s: f64) -> f64 {
    let x = 2.0 * freq_hz * area_m2.sqrt() / mean_speed_m_s;
    1.0 / (1.0 + x.powf(4.0 / 3.0)).powi(2)
}

impl WindSpec {
    /// A spec with no shelter and sea-level ISA air density.
    pub fn new(kind: WindSpectrum, mean_speed_m_s: f64, height_m: f64, turbulence: Turbulence) -> Self {
        Self {
            kind,
            mean_speed_m_s,
            height_m,
            turbulence,
            shelter_factor: 1.0,
            air_density_kg_m3: AIR_DENSITY_SEA_LEVEL_KG_M3,
            admittance: true,
        }
    }

    /// Switch the aerodynamic admittance on (default) or off (quasi-steady drag).
    pub fn with_admittance(mut self, on: bool) -> Self {
        self.admittance = on;
        self
    }

    /// |χ|² on `grid` for a load of `area_m2` at the sheltered mean speed, or `None` when the
    /// admittance is off.
    pub fn admittance_sq(&self, grid: &FreqGrid, area_m2: f64) -> Result<Option<Vec<f64>>> {
        if !self.admittance {
            return Ok(None);
        }
        require_positive("area_m2", area_m2)?;
        let u = self.effective_speed_m_s()?;
        Ok(Some(grid.hz().iter().map(|&f| vickery_admittance_sq(f, area_m2, u)).collect()))
    }

    /// Share of σ_u² carried by frequencies below `f_hz`: ∫₀^f S_u / σ_u², by the trapezoid rule
    /// on a log grid of 4000 points from 10⁻⁶ f (the spectra are flat there, so the part left
    /// out is about 10⁻⁶ of the share).
    pub fn variance_share_below(&self, f_hz: f64) -> Result<f64> {
        require_positive("f_hz", f_hz)?;
        let grid = FreqGrid::log(1e-6 * f_hz, f_hz, 4000)?;
        let s = self.velocity_psd(&grid)?;
        let below = crate::grid::trapezoid(grid.hz(), s.values());
        let var = self.sigma_u_m_s()?.powi(2);
        Ok((below / var).clamp(0.0, 1.0))
    }

    /// Set the shelter factor.
    pub fn with_shelter_factor(mut self, s: f64) -> Self {
        self.shelter_factor = s;
        self
    }

    /// Set the air density (kg/m³).
    pub fn with_air_density(mut self, rho_kg_m3: f64) -> Self {
        self.air_density_kg_m3 = rho_kg_m3;
        self
    }

    /// Check every field; errors name the field and value.
    pub fn validate(&self) -> Result<()> {
        require_positive("mean_speed_m_s", self.mean_speed_m_s)?;
        require_positive("height_m", self.height_m)?;
        require_positive("air_density_kg_m3", self.air_density_kg_m3)?;
        require_positive("shelter_factor", self.shelter_factor)?;
        if self.shelter_factor > 1.0 {
            return Err(Error::invalid(
                "shelter_factor",
                format!("must be <= 1, got {}", self.shelter_factor),
            ));
        }
        match self.turbulence {
            Turbulence::RoughnessLength { z0_m } => {
                require_positive("z0_m", z0_m)?;
                if self.height_m <= std::f64::consts::E * z0_m {
                    return Err(Error::invalid(
                        "z0_m",
                        format!(
                            "height_m = {} must exceed e·z0 = {} (turbulence intensity 1/ln(z/z0) >= 1)",
                            self.height_m,
                            std::f64::consts::E * z0_m
                        ),
                    ));
                }
            }
            Turbulence::Intensity(i) => {
                require_positive("turbulence_intensity", i)?;
                if i > 1.0 {
                    return Err(Error::invalid("turbulence_intensity", format!("must be <= 1, got {i}")));
                }
            }
        }
        Ok(())
    }

    /// Mean speed after sheltering, shelter_factor · U (m/s).
    pub fn effective_speed_m_s(&self) -> Result<f64> {
        self.validate()?;
        Ok(self.shelter_factor * self.mean_speed_m_s)
    }

    /// Turbulence intensity I_u = σ_u / U.
    pub fn turbulence_intensity(&self) -> Result<f64> {
        self.validate()?;
        Ok(match self.turbulence {
            Turbulence::RoughnessLength { z0_m } => {
                SIGMA_U_OVER_U_STAR * VON_KARMAN_CONSTANT / (self.height_m / z0_m).ln()
            }
            Turbulence::Intensity(i) => i,
        })
    }

    /// Standard deviation of the along-wind gust σ_u = I_u · U_eff (m/s).
    pub fn sigma_u_m_s(&self) -> Result<f64> {
        Ok(self.turbulence_intensity()? * self.effective_speed_m_s()?)
    }

    /// Integral length scale used by the spectrum (m), each with its own, in IEC 61400-1's
    /// turbulence scale parameter Λ = 0.7·min(z, 60 m): L_u = 8.1 Λ for Kaimal-IEC, L = 3.5 Λ
    /// for von Kármán (the isotropic model of IEC 61400-1 ed. 2, annex B; from memory: verify),
    /// 1200 m for Davenport, z for Kaimal (1972) (its similarity variable n z/U).
    pub fn length_scale_m(&self) -> Result<f64> {
        self.validate()?;
        let lambda = 0.7 * self.height_m.min(60.0);
        Ok(match self.kind {
            WindSpectrum::Kaimal => self.height_m,
            WindSpectrum::KaimalIec => 8.1 * lambda,
            WindSpectrum::VonKarman => 3.5 * lambda,
            WindSpectrum::Davenport => DAVENPORT_LENGTH_M,
        })
    }

    /// The same wind at another height by the logarithmic profile U(z) ∝ ln(max(z, z_min)/z0)
    /// (EN 1991-1-4:2005 §4.3.2, with its z_min, [`log_profile_min_height_m`]): z0 from
    /// [`Turbulence::RoughnessLength`], else [`DEFAULT_ROUGHNESS_LENGTH_M`]. σ_u stays as at the
    /// given height (σ_u ≈ 2.5 u* throughout the surface layer), so an intensity becomes
    /// σ_u / U(z). A forecast's 10 m wind carried to 1.5 m over grass keeps ln(2/0.05)/ln(10/0.05)
    /// = 0.70 of its speed.
    pub fn carried_to(&self, height_m: f64) -> Result<WindSpec> {
        self.validate()?;
        require_positive("wind load height_m", height_m)?;
        let z0 = match self.turbulence {
            Turbulence::RoughnessLength { z0_m } => z0_m,
            Turbulence::Intensity(_) => DEFAULT_ROUGHNESS_LENGTH_M,
        };
        let z_min = log_profile_min_height_m(z0);
        let ratio = (height_m.max(z_min) / z0).ln() / (self.height_m.max(z_min) / z0).ln();
        let sigma = self.sigma_u_m_s()?;
        let mut w = self.clone();
        w.mean_speed_m_s = self.mean_speed_m_s * ratio;
        w.height_m = height_m;
        if let Turbulence::Intensity(_) = self.turbulence {
            w.turbulence = Turbulence::Intensity(sigma / w.effective_speed_m_s()?);
        }
        w.validate()?;
        Ok(w)
    }

    /// Along-wind velocity PSD ((m/s)²/Hz) on `grid`, normalised to σ_u² (module docs).
    pub fn velocity_psd(&self, grid: &FreqGrid) -> Result<Psd> {
        let u = self.effective_speed_m_s()?;
        let s2 = self.sigma_u_m_s()?.powi(2);
        let l = self.length_scale_m()?;
        let sigma = s2.sqrt();
        let values = grid
            .hz()
            .iter()
            .map(|&f| match self.kind {
                // 105·(1/33)·(3/2) = 4.7727…: the variance of the unnormalised shape per u*².
                WindSpectrum::Kaimal => kaimal_1972(f, 1.0, l, u) * s2 / (105.0 * 1.5 / 33.0),
                WindSpectrum::KaimalIec => kaimal_iec(f, sigma, l, u),
                WindSpectrum::VonKarman => von_karman(f, sigma, l, u) / (VON_KARMAN_C_EXACT / 70.8).sqrt(),
                WindSpectrum::Davenport => {
                    let t = l / u;
                    s2 * (2.0 / 3.0) * t * t * f / (1.0 + (f * t).powi(2)).powf(4.0 / 3.0)
                }
            })
            .collect();
        Psd::on_grid(grid, values, Quantity::Velocity)
    }

    fn drag_args(&self, drag_coefficient: f64, area_m2: f64) -> Result<f64> {
        require_positive("drag_coefficient", drag_coefficient)?;
        require_positive("area_m2", area_m2)?;
        self.validate()?;
        Ok(self.air_density_kg_m3 * drag_coefficient * area_m2)
    }

    /// Mean drag F = ½ ρ C_d A U_eff² (N) (docs/references.md#s6-6).
    pub fn mean_drag_force_n(&self, drag_coefficient: f64, area_m2: f64) -> Result<f64> {
        let k = self.drag_args(drag_coefficient, area_m2)?;
        Ok(0.5 * k * self.effective_speed_m_s()?.powi(2))
    }

    /// Standard deviation of the linearised fluctuating drag σ_F = ρ C_d A U σ_u = 2 I_u F_mean
    /// (N) (docs/references.md#s6-6, quasi-steady, χ = 1).
    pub fn drag_force_std_n(&self, drag_coefficient: f64, area_m2: f64) -> Result<f64> {
        let k = self.drag_args(drag_coefficient, area_m2)?;
        Ok(k * self.effective_speed_m_s()? * self.sigma_u_m_s()?)
    }

    /// Fluctuating drag force PSD S_F = (ρ C_d A U)² |χ(f)|² S_u (N²/Hz) (docs/references.md#s6-6).
    /// `admittance_sq` gives |χ|² on the grid points (finite, >= 0); `None` means χ = 1, the
    /// quasi-steady limit for a body small compared with the gusts. docs/references.md gives no
    /// admittance formula, so none is built in.
    pub fn drag_force_psd(
        &self,
        drag_coefficient: f64,
        area_m2: f64,
        grid: &FreqGrid,
        admittance_sq: Option<&[f64]>,
    ) -> Result<Psd> {
        let k = self.drag_args(drag_coefficient, area_m2)?;
        let g = (k * self.effective_speed_m_s()?).powi(2);
        let su = self.velocity_psd(grid)?;
        if let Some(chi) = admittance_sq {
            if chi.len() != grid.len() {
                return Err(Error::shape("admittance_sq vs grid", grid.len(), chi.len()));
            }
            if let Some(i) = chi.iter().position(|c| !c.is_finite() || *c < 0.0) {
                return Err(Error::invalid(
                    "admittance_sq",
                    format!("value {} at index {i} must be finite and >= 0", chi[i]),
                ));
            }
        }
        let values = su
            .values()
            .iter()
            .enumerate()
            .map(|(i, s)| g * s * admittance_sq.map_or(1.0, |c| c[i]))
            .collect();
        Psd::on_grid(grid, values, Quantity::Force)
    }

    /// Gust factor G = F_peak / F_mean = 1 + 2 g I_u for the linearised drag with peak factor
    /// `peak_factor` g (> 0) chosen by the caller (from σ_F = 2 I_u F_mean, docs/references.md#s6-6;
    /// no peak factor is given there, g ≈ 3–4 is common practice, no source).
    pub fn gust_factor(&self, peak_factor: f64) -> Result<f64> {
        require_positive("peak_factor", peak_factor)?;
        Ok(1.0 + 2.0 * peak_factor * self.turbulence_intensity()?)
    }

    /// Peak drag F_mean · [`WindSpec::gust_factor`] (N), for static tipping checks.
    pub fn peak_drag_force_n(&self, drag_coefficient: f64, area_m2: f64, peak_factor: f64) -> Result<f64> {
        Ok(self.mean_drag_force_n(drag_coefficient, area_m2)? * self.gust_factor(peak_factor)?)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn wide() -> FreqGrid {
        FreqGrid::log(1e-7, 1e5, 40_001).unwrap()
    }

    #[test]
    fn check_values_of_published_forms() {
        // docs/references.md#s6-5 (computed from the published formulas): U = 5, σ_u = 1, L = 11.34.
        let l = 8.1 * 0.7 * 2.0;
        for (f, kaimal, vk) in [
            (0.01, 7.334235, 8.805564),
            (0.1, 2.167393, 2.524230),
            (1.0, 1.039246e-1, 6.641678e-2),
            (10.0, 2.489313e-3, 1.434147e-3),
        ] {
            assert_relative_eq!(kaimal_iec(f, 1.0, l, 5.0), kaimal, max_relative = 1e-6);
            assert_relative_eq!(von_karman(f, 1.0, l, 5.0), vk, max_relative = 1e-6);
        }
        // Kaimal 1972 with u* = 0.3, z = 2, U = 5 (docs/references.md#s6-5).
        for (f, v) in [(0.01, 3.074311), (0.1, 0.9297050), (1.0, 4.539534e-2), (10.0, 1.090785e-3)] {
            assert_relative_eq!(kaimal_1972(f, 0.3, 2.0, 5.0), v, max_relative = 1e-6);
        }
        // Davenport with U10 = 10, κ = 0.005 (docs/references.md#s6-5).
        for (f, v) in [(0.01, 87.67438), (0.1, 3.780668), (1.0, 8.219946e-2)] {
            assert_relative_eq!(davenport(f, 0.005, 10.0), v, max_relative = 1e-6);
        }
        // The WindSpec IEC form equals the published one (L_u = 8.1·0.7·z for z <= 60 m).
        let s = WindSpec::new(WindSpectrum::KaimalIec, 5.0, 2.0, Turbulence::Intensity(0.2));
        let g = FreqGrid::new(vec![0.01, 0.1, 1.0, 10.0]).unwrap();
        let p = s.velocity_psd(&g).unwrap();
        assert_relative_eq!(p.values()[0], 7.334235, max_relative = 1e-6);
    }

    #[test]
    fn spectra_integrate_to_sigma_squared() {
        // ∫S_u df = σ_u² (docs/references.md#s6 intro, and the integrals of docs/references.md#s6-1
        // to docs/references.md#s6-4), trapezoid on a wide log grid; the normalisation is analytic,
        // the check numerical (1 %).
        for kind in
            [WindSpectrum::Kaimal, WindSpectrum::KaimalIec, WindSpectrum::VonKarman, WindSpectrum::Davenport]
        {
            for (u, z, turb) in [
                (5.0, 2.0, Turbulence::Intensity(0.2)),
                (12.0, 80.0, Turbulence::RoughnessLength { z0_m: 0.03 }),
            ] {
                let s = WindSpec::new(kind, u, z, turb).with_shelter_factor(0.7);
                let p = s.velocity_psd(&wide()).unwrap();
                let s2 = s.sigma_u_m_s().unwrap().powi(2);
                let ms = p.mean_square();
                assert!((ms / s2 - 1.0).abs() < 0.01, "{kind:?} U={u}: {ms} vs {s2}");
                // Tighter than required: the analytic normalisation is exact up to the grid.
                assert!((ms / s2 - 1.0).abs() < 2e-3, "{kind:?} U={u}: {ms} vs {s2}");
            }
        }
        // Unnormalised Kaimal (1972): σ_u² = 4.7727 u*² (docs/references.md#s6-1).
        let g = wide();
        let raw = Psd::on_grid(
            &g,
            g.hz().iter().map(|&f| kaimal_1972(f, 0.3, 2.0, 5.0)).collect(),
            Quantity::Velocity,
        )
        .unwrap();
        assert_relative_eq!(raw.mean_square(), 4.7727 * 0.09, max_relative = 2e-3);
        // Davenport: 6 κ U10² (docs/references.md#s6-4).
        let raw =
            Psd::on_grid(&g, g.hz().iter().map(|&f| davenport(f, 0.005, 10.0)).collect(), Quantity::Velocity)
                .unwrap();
        assert_relative_eq!(raw.mean_square(), 3.0, max_relative = 2e-3);
    }

    #[test]
    fn drag_example() {
        // docs/references.md#s6-6 example: ρ = 1.225, Cd = 1.2, A = 0.18 m², U = 5, σ_u = 1 (I = 0.2):
        // F_mean = 3.3075 N, ρCdAU = 1.323 N/(m/s), σ_F = 1.323 N = 2·0.2·3.3075.
        let s = WindSpec::new(WindSpectrum::VonKarman, 5.0, 2.0, Turbulence::Intensity(0.2));
        assert_relative_eq!(s.mean_drag_force_n(1.2, 0.18).unwrap(), 3.3075, max_relative = 1e-12);
        assert_relative_eq!(s.drag_force_std_n(1.2, 0.18).unwrap(), 1.323, max_relative = 1e-12);
        let g = wide();
        let f = s.drag_force_psd(1.2, 0.18, &g, None).unwrap();
        assert_eq!(f.quantity(), Quantity::Force);
        let su = s.velocity_psd(&g).unwrap();
        for (a, b) in f.values().iter().zip(su.values()).step_by(997) {
            assert_relative_eq!(*a, 1.323f64.powi(2) * b, max_relative = 1e-12);
        }
        assert_relative_eq!(f.rms(), 1.323, max_relative = 2e-3);
        let half = vec![0.5; g.len()];
        let fh = s.drag_force_psd(1.2, 0.18, &g, Some(&half)).unwrap();
        assert_relative_eq!(fh.mean_square(), 0.5 * f.mean_square(), max_relative = 1e-12);
        assert!(matches!(s.drag_force_psd(1.2, 0.18, &g, Some(&[1.0])), Err(Error::ShapeMismatch { .. })));
        assert_relative_eq!(s.gust_factor(3.5).unwrap(), 2.4, max_relative = 1e-12);
        assert_relative_eq!(s.peak_drag_force_n(1.2, 0.18, 3.5).unwrap(), 3.3075 * 2.4, max_relative = 1e-12);
        // Shelter 0.5 halves U and σ_u: F_mean and σ_F drop by 4.
        let sh = s.clone().with_shelter_factor(0.5);
        assert_relative_eq!(sh.mean_drag_force_n(1.2, 0.18).unwrap(), 3.3075 / 4.0, max_relative = 1e-12);
        assert_relative_eq!(sh.drag_force_std_n(1.2, 0.18).unwrap(), 1.323 / 4.0, max_relative = 1e-12);
    }

    #[test]
    fn isa_density() {
        // docs/references.md#s6-6 (computed from the ISA definition): 1.2250, 1.1116, 1.0065, 0.9091.
        for (h, rho) in [(0.0, 1.2250), (1000.0, 1.1116), (2000.0, 1.0065), (3000.0, 0.9091)] {
            assert!((isa_air_density_kg_m3(h).unwrap() - rho).abs() < 6e-5, "{h}");
        }
        assert!(isa_air_density_kg_m3(20_000.0).unwrap_err().to_string().contains("20000"));
    }

    #[test]
    fn roughness_gives_log_law_intensity() {
        // I_u = 1/ln(z/z0) from u* = κU/ln(z/z0), σ_u = 2.5u* (κ = 0.4; from memory: verify).
        let s = WindSpec::new(WindSpectrum::Kaimal, 8.0, 10.0, Turbulence::RoughnessLength { z0_m: 0.05 });
        assert_relative_eq!(s.turbulence_intensity().unwrap(), 1.0 / (200f64).ln(), max_relative = 1e-14);
    }

    #[test]
    fn log_profile_carries_a_forecast_height_down_with_sigma_kept() {
        // EN 1991-1-4 §4.3.2: v(z) ∝ ln(max(z, z_min)/z0); category II: z0 = 0.05, z_min = 2 m.
        let s = WindSpec::new(WindSpectrum::Kaimal, 8.0, 10.0, Turbulence::Intensity(0.15));
        let c = s.carried_to(1.5).unwrap();
        let ratio = (2.0f64 / 0.05).ln() / (10.0f64 / 0.05).ln();
        assert_relative_eq!(ratio, 0.6963, max_relative = 1e-4);
        assert_relative_eq!(c.mean_speed_m_s, 8.0 * ratio, max_relative = 1e-14);
        assert_relative_eq!(c.sigma_u_m_s().unwrap(), s.sigma_u_m_s().unwrap(), max_relative = 1e-14);
        assert_eq!(c.height_m, 1.5);
        // Above z_min the log law itself; the same height changes nothing.
        let r = WindSpec::new(WindSpectrum::Kaimal, 8.0, 10.0, Turbulence::RoughnessLength { z0_m: 0.3 });
        let c = r.carried_to(30.0).unwrap();
        assert_relative_eq!(
            c.mean_speed_m_s,
            8.0 * (100f64).ln() / (10.0f64 / 0.3).ln(),
            max_relative = 1e-14
        );
        assert_relative_eq!(s.carried_to(10.0).unwrap().mean_speed_m_s, 8.0, max_relative = 1e-15);
        // z_min by the nearest category: 0.03 m is nearer 0.05 (II, 2 m) than 0.01 (I, 1 m).
        assert_eq!(log_profile_min_height_m(0.03), 2.0);
        assert_eq!(log_profile_min_height_m(0.005), 1.0);
        assert_eq!(log_profile_min_height_m(0.5), 5.0);
        assert!(s.carried_to(0.0).is_err());
    }

    #[test]
    fn von_karman_and_kaimal_iec_keep_their_own_length_scales() {
        let k = WindSpec::new(WindSpectrum::KaimalIec, 5.0, 20.0, Turbulence::Intensity(0.2));
        let v = WindSpec { kind: WindSpectrum::VonKarman, ..k.clone() };
        assert_relative_eq!(k.length_scale_m().unwrap(), 8.1 * 14.0, max_relative = 1e-14);
        assert_relative_eq!(v.length_scale_m().unwrap(), 3.5 * 14.0, max_relative = 1e-14);
    }

    #[test]
    fn validation_names_field_and_value() {
        let ok = WindSpec::new(WindSpectrum::Kaimal, 5.0, 2.0, Turbulence::Intensity(0.2));
        let cases = [
            (WindSpec { mean_speed_m_s: 0.0, ..ok.clone() }, "mean_speed_m_s", "0"),
            (WindSpec { height_m: -2.0, ..ok.clone() }, "height_m", "-2"),
            (WindSpec { air_density_kg_m3: f64::NAN, ..ok.clone() }, "air_density_kg_m3", "NaN"),
            (ok.clone().with_shelter_factor(1.5), "shelter_factor", "1.5"),
            (
                WindSpec { turbulence: Turbulence::Intensity(1.2), ..ok.clone() },
                "turbulence_intensity",
                "1.2",
            ),
            (
                WindSpec { turbulence: Turbulence::RoughnessLength { z0_m: 1.0 }, ..ok.clone() },
                "z0_m",
                "2.718",
            ),
        ];
        for (s, name, needle) in cases {
            let e = s.validate().unwrap_err();
            assert!(matches!(&e, Error::InvalidArgument { name: n, .. } if n == name), "{e}");
            assert!(e.to_string().contains(needle), "{e}");
            assert!(s.velocity_psd(&FreqGrid::new(vec![1.0]).unwrap()).is_err());
        }
        assert!(ok.mean_drag_force_n(0.0, 1.0).unwrap_err().to_string().contains("drag_coefficient"));
        let e = WindSpectrum::from_name("harris").unwrap_err();
        assert!(e.to_string().contains("von-karman"), "{e}");
        assert_eq!(WindSpectrum::from_name("Von_Karman").unwrap(), WindSpectrum::VonKarman);
    }

    #[test]
    fn vickery_admittance_matches_its_formula() {
        // |χ|² = 1/[1 + (2n√A/U)^{4/3}]² (Vickery 1965, as quoted by Holmes; docs/references.md#s6-7):
        // 2n√A/U = 1 gives 1/4, = 8 gives 1/(1 + 16)² = 1/289; it tends to 1 as n → 0.
        assert_relative_eq!(vickery_admittance_sq(0.5, 1.0, 1.0), 0.25, max_relative = 1e-6);
        assert_relative_eq!(vickery_admittance_sq(8.0, 0.25, 1.0), 1.0 / 289.0, max_relative = 1e-6);
        assert_relative_eq!(vickery_admittance_sq(1e-9, 0.2, 4.0), 1.0, max_relative = 1e-6);
        for &(n, a, u) in &[(18.3f64, 0.2f64, 4.0f64), (0.7, 0.05, 12.0), (3.0, 1.5, 2.0)] {
            let x = 2.0 * n * a.sqrt() / u;
            let want = (1.0 + x.powf(4.0 / 3.0)).powi(-2);
            assert_relative_eq!(vickery_admittance_sq(n, a, u), want, max_relative = 1e-6);
        }
        // On by default and applied by drag_force_psd's caller; off gives χ = 1.
        let s = WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2));
        let g = FreqGrid::log(0.1, 50.0, 20).unwrap();
        let chi = s.admittance_sq(&g, 0.2).unwrap().unwrap();
        assert_relative_eq!(chi[19], vickery_admittance_sq(50.0, 0.2, 4.0), max_relative = 1e-12);
        assert!(s.clone().with_admittance(false).admittance_sq(&g, 0.2).unwrap().is_none());
    }

    #[test]
    fn share_of_the_gust_variance_below_a_frequency() {
        // Kaimal-IEC integrates in closed form: ∫₀^f S_u = σ_u² [1 − (1 + 6 f L/U)^{−2/3}]
        // (docs/references.md#s6-2 spectrum, integrated by hand).
        let s = WindSpec::new(WindSpectrum::KaimalIec, 4.0, 2.0, Turbulence::Intensity(0.2));
        let l = s.length_scale_m().unwrap();
        for f in [0.02, 0.2, 2.0] {
            let want = 1.0 - (1.0 + 6.0 * f * l / 4.0).powf(-2.0 / 3.0);
            assert_relative_eq!(s.variance_share_below(f).unwrap(), want, max_relative = 1e-4);
        }
    }

    #[test]
    fn air_density_from_elevation_and_temperature() {
        // At the ISA temperature of the height it is the ISA density; at 1000 m and 15 °C it is
        // the ISA pressure there, 89 874.6 Pa (ISA tables, from memory), over R T:
        // 89 874.6 / (287.05287 × 288.15) = 1.08656 kg/m³.
        for h in [0.0, 1000.0, 2500.0] {
            let t = 15.0 - 0.0065 * h;
            assert_relative_eq!(
                air_density_kg_m3(h, t).unwrap(),
                isa_air_density_kg_m3(h).unwrap(),
                max_relative = 1e-12
            );
        }
        assert_relative_eq!(air_density_kg_m3(1000.0, 15.0).unwrap(), 1.08656, max_relative = 1e-4);
        assert!(air_density_kg_m3(0.0, -10.0).unwrap() > air_density_kg_m3(0.0, 30.0).unwrap());
        assert!(air_density_kg_m3(0.0, 99.0).is_err() && air_density_kg_m3(20_000.0, 0.0).is_err());
    }
}
