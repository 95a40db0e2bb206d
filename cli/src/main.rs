//! `stillsky`: command-line front end. Parses arguments, calls the core library, prints and
//! plots; all computation lives in the `stillsky` crate.

mod html;
mod plots;
mod print;
mod verdict;

use clap::{Args, Parser, Subcommand};
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use stillsky::batch::{self, Catalogue, GroundSource, ReportOptions, SweepConfig, SweepInputs, WindCase};
use stillsky::checks::{CheckReport, StaticWind};
use stillsky::guider::GuideLoop;
use stillsky::io::series::{Sensitivity, SeriesOptions, Unit, read_series};
use stillsky::schema::{ModelFile, Pointing};
use stillsky::sky::PierSide;
use stillsky::skymap::{SkyAxes, SkyGrid, stepped};
use stillsky::wind::{Turbulence, WindSpec, WindSpectrum};

#[derive(Parser)]
#[command(name = "stillsky", version, about = "Does the rig hold the star inside one pixel?")]
struct Cli {
    #[command(subcommand)]
    cmd: Cmd,
}

#[derive(Subcommand)]
enum Cmd {
    /// Report on one model: modes, image motion, blur, ground spectrum; optional plots and JSON.
    Report(Box<ReportArgs>),
    /// Image RMS over the sky (altitude × azimuth, or hour angle × declination for an
    /// equatorial rig) into a CSV and a heat map; names the best and worst pointings.
    SkyMap(Box<SkyMapArgs>),
    /// Sweep an isolator catalogue over ground spectra and wind cases into a CSV.
    Sweep(SweepArgs),
    /// Run a design study (a study file: variables, alternative model files, pads, grounds and
    /// winds) into a CSV, with a ranked summary per disturbance and a sensitivity table.
    Study(StudyArgs),
    /// Print the generic-layer TOML a model file expands to.
    Expand {
        /// Model file (TOML).
        model: PathBuf,
    },
    /// Run report and sweep on the bundled demo scenario (docs/examples).
    Demo {
        /// Output folder for plots, JSON, CSV and report.html.
        #[arg(long, default_value = "out/demo")]
        out: PathBuf,
    },
    /// Static safety checks of a rig file: leg stress and buckling, tipping in wind, pier.
    Check {
        /// Model file (TOML with a [tripod] or [pier] rig section).
        model: PathBuf,
        /// Design mean wind speed (m/s).
        #[arg(long, default_value_t = 10.0)]
        design_wind_m_s: f64,
        /// Factor on the mean drag for gusts.
        #[arg(long, default_value_t = 2.0)]
        gust_factor: f64,
        /// Horizontal load at a pier's top, acting with the wind (N).
        #[arg(long, default_value_t = stillsky::pier_table::DEFAULT_LOAD_N)]
        top_load_n: f64,
        /// Foot and surface for the sliding check (overrides tripod.foot_surface), e.g. rubber-on-paver.
        #[arg(long)]
        foot_surface: Option<String>,
    },
    /// Fit model-file numbers (dotted paths) to measured modes; writes the fitted model file.
    Calibrate(CalibrateArgs),
    /// Pier sizing table: tilt at the top under a horizontal load (plus footing rocking), top
    /// deflection, first bending and torsion frequencies, from cantilever formulas and from the
    /// beam model, over outer diameter × wall × height × material.
    PierTable(PierTableArgs),
    /// People on the deck of a model with a [floor]: a walking pass (peak and RMS image
    /// motion), the steady footfall lines, and the static tilt of a person standing at each
    /// distance from the stand.
    DeckLoad(DeckLoadArgs),
    /// Identify frequency and damping from a tap-test ring-down recording: a card with f and ζ
    /// with their uncertainty, the first excursion and the settle time; optionally an SVG and a
    /// before/after comparison.
    Tap(TapArgs),
    /// Transfer function from one recorded channel to another (H1, H2) with their coherence,
    /// e.g. ground to pier top, or a hammer's force to the tube's response.
    Transfer(TransferArgs),
    /// Quiet hours of a site from a long ground recording: the probabilistic PSD per axis
    /// (percentile curves, share of blocks below/above Peterson's noise models), the band RMS
    /// over the hours of the day and, with --model, the hours when the rig holds ½ px.
    QuietHours(QuietHoursArgs),
}

#[derive(Args)]
struct QuietHoursArgs {
    /// Ground recording (CSV/text with `# start_time=`, WAV or miniSEED), read in chunks.
    recording: PathBuf,
    /// Model file (with [optics]): judge every block through the rig.
    #[arg(long)]
    model: Option<PathBuf>,
    /// Block length (s); 3600 as the usual probabilistic PSD.
    #[arg(long, default_value_t = 3600.0)]
    block_s: f64,
    /// Overlap of consecutive blocks (fraction).
    #[arg(long, default_value_t = 0.5)]
    overlap: f64,
    /// Band of the hour map as LO:HI in Hz (repeatable); default 1:10.
    #[arg(long = "band")]
    bands: Vec<String>,
    /// Sample rate (Hz) for text files without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// miniSEED: counts per unit, as COUNTS:UNIT (e.g. 6.0e8:m_s).
    #[arg(long, value_parser = parse_sensitivity)]
    sensitivity: Option<Sensitivity>,
    /// miniSEED: read only this channel (NET.STA.LOC.CHA or CHA); default every channel of a file
    /// of one to three on one clock, one axis each.
    #[arg(long)]
    channel: Option<String>,
    /// Write SVG plots (percentile curves, hour map) into this folder.
    #[arg(long)]
    plots: Option<PathBuf>,
    /// Write the full result as JSON.
    #[arg(long)]
    json: Option<PathBuf>,
}

#[derive(Args)]
struct TapArgs {
    /// Recording (CSV/text/WAV/miniSEED); a centroid track has columns in px or arcsec.
    file: PathBuf,
    /// Sample rate (Hz) for text files without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// Axis (column) to analyse; default the first.
    #[arg(long)]
    axis: Option<String>,
    /// WAV: the value of digital full scale, as VALUE:UNIT (e.g. 2:g, 0.05:m_s, 40:px).
    #[arg(long, value_parser = parse_full_scale)]
    full_scale: Option<stillsky::io::series::PhysicalValue>,
    /// miniSEED: counts per unit, as COUNTS:UNIT (e.g. 6.0e8:m_s).
    #[arg(long, value_parser = parse_sensitivity)]
    sensitivity: Option<Sensitivity>,
    /// Plate scale (arcsec per px) of an image track; or give --focal-length-mm and --pixel-um.
    #[arg(long, conflicts_with_all = ["focal_length_mm", "pixel_um"])]
    plate_scale: Option<f64>,
    /// Focal length (mm) for the plate scale.
    #[arg(long, requires = "pixel_um")]
    focal_length_mm: Option<f64>,
    /// Pixel size (µm) for the plate scale.
    #[arg(long, requires = "focal_length_mm")]
    pixel_um: Option<f64>,
    /// Settle threshold in the recording's unit (arcsec for an image track; default ½ px with
    /// a plate scale, else 10 % of the first excursion).
    #[arg(long, conflicts_with = "threshold_px")]
    threshold: Option<f64>,
    /// Settle threshold in px (image tracks with a plate scale).
    #[arg(long)]
    threshold_px: Option<f64>,
    /// A second recording (e.g. after fitting pads) to compare with the first.
    #[arg(long)]
    compare: Option<PathBuf>,
    /// Write the card's plot (trace, fitted envelope, threshold band) as SVG.
    #[arg(long)]
    svg: Option<PathBuf>,
    /// Write the card(s) as JSON.
    #[arg(long)]
    json: Option<PathBuf>,
}

#[derive(Args)]
struct TransferArgs {
    /// Recording holding the input channel (CSV/text/WAV/miniSEED).
    input: PathBuf,
    /// Recording holding the output channel (may be the same file).
    output: PathBuf,
    /// Input axis (column); default the first.
    #[arg(long)]
    input_axis: Option<String>,
    /// Output axis (column); default the first.
    #[arg(long)]
    output_axis: Option<String>,
    /// Sample rate (Hz) for text files without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// Welch segment length in samples (default: the power of two nearest 10 s).
    #[arg(long)]
    nperseg: Option<usize>,
    /// Write every bin as CSV: freq_hz, h1 and h2 (magnitude, phase), coherence.
    #[arg(long)]
    csv: Option<PathBuf>,
}

#[derive(Args, Clone)]
struct WindArgs {
    /// Mean wind speed at the given height (m/s).
    #[arg(long)]
    wind_speed: Option<f64>,
    /// Height of the wind speed (m).
    #[arg(long, default_value_t = 2.0)]
    wind_height: f64,
    /// Along-wind spectrum: kaimal, kaimal-iec, von-karman, davenport.
    #[arg(long, default_value = "kaimal")]
    wind_spectrum: String,
    /// Turbulence intensity σ_u / U.
    #[arg(long, default_value_t = stillsky::wind::DEFAULT_TURBULENCE_INTENSITY)]
    turbulence: f64,
    /// The azimuth the wind blows from (deg from north through east, as forecasts give it); the
    /// rig's wind parts are derived for it (default: the file's `[wind_load]`, else 270).
    #[arg(long, allow_negative_numbers = true)]
    wind_from_deg: Option<f64>,
    /// Quasi-steady drag: leave out the aerodynamic admittance of the wind load (on by default).
    #[arg(long)]
    quasi_steady_wind: bool,
    /// Site elevation (m) for the air density (ISA pressure; default sea level, 1.225 kg/m³).
    #[arg(long, allow_negative_numbers = true)]
    site_elevation_m: Option<f64>,
    /// Air temperature (°C) for the air density (default the ISA temperature of the elevation).
    #[arg(long, allow_negative_numbers = true)]
    air_temperature_c: Option<f64>,
}

#[derive(Args, Clone)]
struct GroundArgs {
    /// Ground spectrum: a recording, a PSD file, nlnm or nhnm (default nhnm), or `none`.
    #[arg(long)]
    ground: Option<String>,
    /// Per-axis factor on the ground spectrum, x,y,z.
    #[arg(long, value_parser = parse_triple)]
    ground_scale: Option<[f64; 3]>,
    /// Sample rate (Hz) of text recordings without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// miniSEED recordings: counts per unit, as COUNTS:UNIT (e.g. 6.0e8:m_s); units m_s2, g,
    /// m_s, mm_s, um_s, m, mm, um. Without it miniSEED samples are counts and refused as ground.
    #[arg(long, value_parser = parse_sensitivity)]
    sensitivity: Option<Sensitivity>,
    /// The sensor of the recording (phone-mems, low-noise-mems, geophone-4.5hz): notes where its
    /// spectrum sits at the sensor's noise floor.
    #[arg(long)]
    sensor: Option<String>,
}

/// The cells of a sky map; without any of these the rig's default grid is used.
#[derive(Args, Clone)]
struct SkyGridArgs {
    /// Alt-azimuth rigs: altitudes as FROM:TO:STEP (deg; default 20:90:10).
    #[arg(long, value_parser = parse_range, allow_hyphen_values = true)]
    altitudes: Option<[f64; 3]>,
    /// Alt-azimuth rigs: azimuths as FROM:TO:STEP (deg from north through east; default 0:330:30).
    #[arg(long, value_parser = parse_range, allow_hyphen_values = true)]
    azimuths: Option<[f64; 3]>,
    /// Equatorial rigs: hour angles as FROM:TO:STEP in hours, west positive (default -6:6:1).
    #[arg(long, value_parser = parse_range, allow_hyphen_values = true)]
    hour_angles_h: Option<[f64; 3]>,
    /// Equatorial rigs: declinations as FROM:TO:STEP (deg; default the band reaching 20°
    /// altitude on the meridian, by 10°).
    #[arg(long, value_parser = parse_range, allow_hyphen_values = true)]
    declinations: Option<[f64; 3]>,
    /// Pointings lower than this altitude (deg) are not mapped (default 20).
    #[arg(long, allow_negative_numbers = true)]
    min_altitude_deg: Option<f64>,
}

#[derive(Args)]
struct SkyMapArgs {
    /// Model file (TOML: rig or generic layer, with [optics]).
    model: PathBuf,
    #[command(flatten)]
    ground: GroundArgs,
    #[command(flatten)]
    wind: WindArgs,
    #[arg(long)]
    focal_length_mm: Option<f64>,
    #[arg(long)]
    pixel_um: Option<f64>,
    #[command(flatten)]
    sky: SkyGridArgs,
    /// Write the map as CSV (one row per cell: the two coordinates, rms_arcsec, rms_px).
    #[arg(long)]
    csv: Option<PathBuf>,
    /// Write the heat map as SVG.
    #[arg(long)]
    svg: Option<PathBuf>,
    /// Write the map as JSON.
    #[arg(long)]
    json: Option<PathBuf>,
}

#[derive(Args)]
struct ReportArgs {
    /// Model file (TOML: rig or generic layer).
    model: PathBuf,
    #[command(flatten)]
    ground: GroundArgs,
    #[command(flatten)]
    wind: WindArgs,
    /// Add a sky map (image RMS over the sky, best and worst pointings) to the report.
    #[arg(long)]
    sky_map: bool,
    #[command(flatten)]
    sky: SkyGridArgs,
    #[command(flatten)]
    person: PersonArgs,
    #[arg(long)]
    focal_length_mm: Option<f64>,
    #[arg(long)]
    pixel_um: Option<f64>,
    /// Pointing altitude (deg); the payload is posed for it as if the file said so.
    #[arg(long, allow_negative_numbers = true)]
    altitude_deg: Option<f64>,
    /// Pointing azimuth (deg from north through east); poses the payload like --altitude-deg.
    #[arg(long, allow_negative_numbers = true)]
    azimuth_deg: Option<f64>,
    /// Equatorial rigs: hour angle (deg, positive west); poses the payload and counterweights.
    #[arg(long, allow_negative_numbers = true)]
    hour_angle_deg: Option<f64>,
    /// Equatorial rigs: declination (deg).
    #[arg(long, allow_negative_numbers = true)]
    declination_deg: Option<f64>,
    /// Equatorial rigs: side of the pier the tube is on, east or west (default by hour angle).
    #[arg(long, value_parser = parse_pier_side)]
    pier_side: Option<PierSide>,
    /// Exposure length (s): splits the motion into centroid wander and smear.
    #[arg(long)]
    exposure_s: Option<f64>,
    /// Guide camera cadence (s); needs --guide-gain.
    #[arg(long, requires = "guide_gain")]
    guide_cadence_s: Option<f64>,
    /// Guider integral gain (> 0; the loop must be stable: below 2 for a pure integrator with
    /// the default guide exposure and latency).
    #[arg(long, requires = "guide_cadence_s")]
    guide_gain: Option<f64>,
    /// Guide camera exposure (s, at most the cadence; default the cadence).
    #[arg(long, requires = "guide_cadence_s")]
    guide_exposure_s: Option<f64>,
    /// Time from the end of a guide exposure to the correction (s, default 0).
    #[arg(long, requires = "guide_cadence_s")]
    guide_latency_s: Option<f64>,
    /// Guider proportional gain (default 0: a pure integrator).
    #[arg(long, requires = "guide_cadence_s")]
    guide_proportional_gain: Option<f64>,
    /// Clear aperture (mm) for the diffraction line of the star budget, overrides the model's.
    #[arg(long)]
    aperture_mm: Option<f64>,
    /// Wavelength (nm) for diffraction, overrides the model's (default 550).
    #[arg(long)]
    wavelength_nm: Option<f64>,
    /// Seeing FWHM (arcsec), overrides the model's.
    #[arg(long)]
    seeing_arcsec: Option<f64>,
    /// A tonal disturbance line, FREQ_HZ:INPUT:RMS_AMPLITUDE:UNIT (repeatable), e.g.
    /// 24:ground_z:1e-6:m_s or 50:force:deck:z@1,0,0.1:2:N. Units m, m_s, m_s2 (ground
    /// translation), rad, N, N_m. The amplitude is the RMS (a sinusoid of peak a: a/√2).
    #[arg(long = "tone")]
    tones: Vec<String>,
    /// Carry the ground spectrum and the ground tonal lines from FROM m to TO m from their
    /// source (Bornitz spreading and soil damping; a rough estimate), e.g. 5:20.
    #[arg(long)]
    ground_distance_m: Option<String>,
    /// Wave kind of --ground-distance-m: surface (spreading 0.5), body (1), body-at-surface (2).
    #[arg(long, default_value = "surface", requires = "ground_distance_m")]
    wave_kind: String,
    /// Soil loss factor of --ground-distance-m (2 × damping ratio).
    #[arg(long, default_value_t = stillsky::distance_attenuation::DEFAULT_SOIL_LOSS_FACTOR, requires = "ground_distance_m")]
    soil_loss_factor: f64,
    /// Soil wave speed (m/s) of --ground-distance-m; default the site's phase velocity from the
    /// model (on soil its Rayleigh-wave speed), else 200 m/s.
    #[arg(long, requires = "ground_distance_m")]
    soil_wave_speed_m_s: Option<f64>,
    /// Isolator catalogue (TOML): the gust table and plot show the rig with each pad beside it.
    #[arg(long)]
    catalogue: Option<PathBuf>,
    /// Write SVG plots into this folder.
    #[arg(long)]
    plots: Option<PathBuf>,
    /// Write the full result as JSON.
    #[arg(long)]
    json: Option<PathBuf>,
    /// Write one self-contained HTML page (verdict, tables, plots, checks, inputs).
    #[arg(long)]
    html: Option<PathBuf>,
}

#[derive(Args)]
struct SweepArgs {
    /// Model file: a rig with [tripod] (pads under the feet), or a generic layer with pad springs.
    #[arg(long)]
    model: PathBuf,
    /// Isolator catalogue (TOML).
    #[arg(long)]
    catalogue: PathBuf,
    /// Ground spectra: recordings, PSD files, folders of them, nlnm, nhnm.
    #[arg(long, num_args = 1.., required = true)]
    ground: Vec<String>,
    /// Wind cases: calm, or SPEED[:HEIGHT[:SPECTRUM[:INTENSITY]]] (default: calm).
    #[arg(long, num_args = 1..)]
    wind: Vec<String>,
    /// Output CSV.
    #[arg(long)]
    out: PathBuf,
    /// Write one self-contained HTML page (verdict, rankings, plot, inputs).
    #[arg(long)]
    html: Option<PathBuf>,
    /// Continue an interrupted run, keeping its complete rows.
    #[arg(long)]
    resume: bool,
    /// Per-axis factor on PSD files and reference models, x,y,z.
    #[arg(long, value_parser = parse_triple)]
    ground_scale: Option<[f64; 3]>,
    /// Prefix of the pad springs in a generic-layer model.
    #[arg(long, default_value = batch::DEFAULT_PAD_PREFIX)]
    pad_prefix: String,
    /// Sample rate (Hz) of text recordings without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// miniSEED recordings: counts per unit, as COUNTS:UNIT (e.g. 6.0e8:m_s); units m_s2, g,
    /// m_s, mm_s, um_s, m, mm, um. Without it miniSEED samples are counts and refused as ground.
    #[arg(long, value_parser = parse_sensitivity)]
    sensitivity: Option<Sensitivity>,
    /// The night's temperature (°C): pads with a temperature table take their values at it
    /// (linear between rows, refused outside); default 20, the catalogue as written.
    #[arg(long, allow_negative_numbers = true, default_value_t = batch::NOMINAL_TEMPERATURE_C)]
    temperature_c: f64,
    /// The sensor of the recordings (phone-mems, low-noise-mems, geophone-4.5hz): warns where a
    /// recording's spectrum sits at the sensor's noise floor before the ranking uses it.
    #[arg(long)]
    sensor: Option<String>,
}

#[derive(Args)]
struct StudyArgs {
    /// Study file (TOML; see docs/study-file.md).
    study: PathBuf,
    /// Output CSV (one row per variant, ground and wind).
    #[arg(long)]
    out: PathBuf,
    /// Continue an interrupted run, keeping its complete rows.
    #[arg(long)]
    resume: bool,
    /// Write the sensitivity chart and outcome-against-variable plots (SVG) into this folder.
    #[arg(long)]
    plots: Option<PathBuf>,
    /// Threads (default: all cores); the rows do not depend on it.
    #[arg(long)]
    threads: Option<usize>,
}

/// The person on the deck (report and deck-load).
#[derive(Args)]
struct PersonArgs {
    /// Body mass of the person on the deck (kg; 75 is common practice, no source).
    #[arg(long, default_value_t = stillsky::people::DEFAULT_BODY_MASS_KG)]
    person_kg: f64,
    /// Walking pace (steps per second, Hz; 1-2.8).
    #[arg(long, default_value_t = stillsky::people::DEFAULT_PACE_HZ)]
    pace_hz: f64,
    /// Load factors of the footfall harmonics: fixed (0.5, 0.2, 0.1, 0.05) or pace (growing
    /// with the pace).
    #[arg(long, default_value = "fixed")]
    footfall: String,
    /// Where the walker treads: x,y (m, x east, y north) from the stand's axis.
    #[arg(long, value_delimiter = ',', num_args = 2, allow_negative_numbers = true, default_values_t = [stillsky::people::DEFAULT_WALK_DISTANCE_M, 0.0])]
    walk_at_m: Vec<f64>,
    /// Length of the walking pass (s).
    #[arg(long, default_value_t = stillsky::people::DEFAULT_PASS_S)]
    walk_s: f64,
}

#[derive(Args)]
struct DeckLoadArgs {
    /// Model file with a [floor] and [optics].
    model: PathBuf,
    #[command(flatten)]
    person: PersonArgs,
    /// Distances from the stand for the standing table (m), comma-separated, increasing.
    #[arg(long, value_delimiter = ',')]
    distances_m: Option<Vec<f64>>,
    /// Image limit of the standing table (px).
    #[arg(long, default_value_t = stillsky::people::DEFAULT_LIMIT_PX)]
    limit_px: f64,
    /// Write the standing table as CSV.
    #[arg(long)]
    csv: Option<PathBuf>,
}

#[derive(Args)]
struct PierTableArgs {
    /// Outer diameters of the tube (m), comma-separated.
    #[arg(long, value_delimiter = ',', required = true)]
    od: Vec<f64>,
    /// Wall thicknesses (m), comma-separated (half the diameter for a solid column).
    #[arg(long, value_delimiter = ',', required = true)]
    wall: Vec<f64>,
    /// Heights from the footing to the top (m), comma-separated.
    #[arg(long, value_delimiter = ',', required = true)]
    height: Vec<f64>,
    /// Material presets, comma-separated (stainless-304, aluminium-6061-t6, carbon-fibre-tube,
    /// white-ash, steel-s235, concrete-c30).
    #[arg(long, value_delimiter = ',', default_value = "steel-s235")]
    material: Vec<String>,
    /// Density of a fill inside the tube (kg/m³); it adds mass in bending.
    #[arg(long)]
    fill_density: Option<f64>,
    /// Horizontal load at the top (N); 22 N is a figure of pier-design practice (common
    /// practice, no source).
    #[arg(long, default_value_t = stillsky::pier_table::DEFAULT_LOAD_N)]
    load_n: f64,
    /// Mass on the top, mount and payload (kg; the default is a placeholder: give yours).
    #[arg(long, default_value_t = stillsky::pier_table::DEFAULT_TOP_MASS_KG)]
    top_mass_kg: f64,
    /// Moment of inertia of the top mass about the vertical axis (kg·m²; placeholder default).
    #[arg(long, default_value_t = stillsky::pier_table::DEFAULT_TOP_INERTIA_KGM2)]
    top_inertia_kgm2: f64,
    /// Footing rocking stiffness (N·m/rad); without it and --soil the base is rigid.
    #[arg(long, conflicts_with = "soil")]
    rocking_nm_per_rad: Option<f64>,
    /// Soil preset under a round footing (soft-clay, lawn, dense-sand, gravel); needs
    /// --footing-diameter.
    #[arg(long, requires = "footing_diameter")]
    soil: Option<String>,
    /// Diameter of the round footing on --soil (m).
    #[arg(long, requires = "soil")]
    footing_diameter: Option<f64>,
    /// Write the table as CSV (all columns, full precision).
    #[arg(long)]
    csv: Option<PathBuf>,
}

#[derive(Args)]
struct CalibrateArgs {
    /// Model file (TOML).
    model: PathBuf,
    /// A number to fit, as PATH=LOWER:UPPER (e.g. mount.tilt_stiffness_nm_per_rad=5e3:1e5,
    /// spring[pad].stiffness_n_per_m=1e4:1e6). Repeatable.
    #[arg(long = "param", required = true, value_parser = parse_param)]
    params: Vec<stillsky::identify::CalibrationParameter>,
    /// A measured mode, as FREQ_HZ or FREQ_HZ:DAMPING_RATIO. Repeatable.
    #[arg(long = "target", value_parser = parse_target)]
    targets: Vec<stillsky::identify::ModalTarget>,
    /// A tap-test recording whose identified modes become targets (with the given ones).
    #[arg(long)]
    tap: Option<PathBuf>,
    /// Sample rate (Hz) of a text tap recording without a time column or `# fs_hz=` line.
    #[arg(long)]
    fs: Option<f64>,
    /// Axis (column) of the tap recording; default the first.
    #[arg(long)]
    axis: Option<String>,
    /// Weight of a damping residual against a frequency residual of the same relative size
    /// (0.1: a tap gives ζ to about 10 % and f to about 0.1–1 %).
    #[arg(long, default_value_t = stillsky::identify::DEFAULT_DAMPING_WEIGHT)]
    damping_weight: f64,
    /// Write the fitted model file here (atomically).
    #[arg(long)]
    out: Option<PathBuf>,
}

fn parse_param(s: &str) -> Result<stillsky::identify::CalibrationParameter, String> {
    let (path, range) = s.split_once('=').ok_or("expected PATH=LOWER:UPPER")?;
    let (lo, hi) = range.split_once(':').ok_or("expected PATH=LOWER:UPPER")?;
    let num = |x: &str| x.trim().parse::<f64>().map_err(|_| format!("'{x}' is not a number"));
    Ok(stillsky::identify::CalibrationParameter {
        path: path.trim().to_string(),
        lower: num(lo)?,
        upper: num(hi)?,
    })
}

fn parse_target(s: &str) -> Result<stillsky::identify::ModalTarget, String> {
    let num = |x: &str| x.trim().parse::<f64>().map_err(|_| format!("'{x}' is not a number"));
    Ok(match s.split_once(':') {
        Some((f, z)) => stillsky::identify::ModalTarget::frequency(num(f)?).with_damping(num(z)?),
        None => stillsky::identify::ModalTarget::frequency(num(s)?),
    })
}

fn parse_pier_side(s: &str) -> Result<PierSide, String> {
    match s {
        "east" => Ok(PierSide::East),
        "west" => Ok(PierSide::West),
        _ => Err(format!("expected east or west, got '{s}'")),
    }
}

fn parse_range(s: &str) -> Result<[f64; 3], String> {
    let v: Vec<f64> = s
        .split(':')
        .map(|x| x.trim().parse::<f64>().map_err(|_| format!("'{x}' is not a number")))
        .collect::<Result<_, _>>()?;
    <[f64; 3]>::try_from(v).map_err(|v| format!("need FROM:TO:STEP, got {} value(s)", v.len()))
}

fn parse_triple(s: &str) -> Result<[f64; 3], String> {
    let v: Vec<f64> = s
        .split(',')
        .map(|x| x.trim().parse::<f64>().map_err(|_| format!("'{x}' is not a number")))
        .collect::<Result<_, _>>()?;
    <[f64; 3]>::try_from(v).map_err(|v| format!("need three values x,y,z, got {}", v.len()))
}

/// A failure with the exit code to return.
struct Failure {
    code: u8,
    message: String,
}

impl From<stillsky::Error> for Failure {
    fn from(e: stillsky::Error) -> Self {
        Failure { code: 2, message: e.to_string() }
    }
}

impl Failure {
    fn io(what: &str, e: impl std::fmt::Display) -> Self {
        Failure { code: 2, message: format!("{what}: {e}") }
    }
}

type CliResult = Result<(), Failure>;

fn main() -> ExitCode {
    let cli = Cli::parse();
    let r = match cli.cmd {
        Cmd::Report(a) => report(&a),
        Cmd::SkyMap(a) => sky_map(&a),
        Cmd::Sweep(a) => sweep(&a),
        Cmd::Study(a) => study(&a),
        Cmd::Expand { model } => expand(&model),
        Cmd::Demo { out } => demo(&out),
        Cmd::Calibrate(a) => calibrate(&a),
        Cmd::PierTable(a) => pier_table(&a),
        Cmd::DeckLoad(a) => deck_load(&a),
        Cmd::Tap(a) => tap(&a),
        Cmd::Transfer(a) => transfer(&a),
        Cmd::QuietHours(a) => quiet_hours(&a),
        Cmd::Check { model, design_wind_m_s, gust_factor, top_load_n, foot_surface } => {
            let options = stillsky::checks::StaticOptions { top_load_n, foot_surface };
            check(&model, design_wind_m_s, gust_factor, &options)
        }
    };
    match r {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("error: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}

fn series_options(fs: Option<f64>, sensitivity: Option<Sensitivity>) -> SeriesOptions {
    let mut o = SeriesOptions::default();
    if let Some(f) = fs {
        o = o.with_fs_hz(f);
    }
    if let Some(s) = sensitivity {
        o = o.with_sensitivity(s);
    }
    o
}

fn parse_sensitivity(s: &str) -> Result<Sensitivity, String> {
    let (c, u) =
        s.split_once(':').ok_or_else(|| format!("expected COUNTS:UNIT (e.g. 6.0e8:m_s), got '{s}'"))?;
    let counts: f64 = c.trim().parse().map_err(|_| format!("counts per unit '{c}' is not a number"))?;
    if !counts.is_finite() || counts == 0.0 {
        return Err(format!("counts per unit must be finite and non-zero, got {counts}"));
    }
    let unit = Unit::parse(u).map_err(|e| e.to_string())?;
    Ok(Sensitivity::new(counts, unit))
}

fn wind_spec(w: &WindArgs) -> Result<Option<WindSpec>, Failure> {
    let Some(u) = w.wind_speed else { return Ok(None) };
    let kind = WindSpectrum::from_name(&w.wind_spectrum)?;
    let mut spec = WindSpec::new(kind, u, w.wind_height, Turbulence::Intensity(w.turbulence))
        .with_admittance(!w.quasi_steady_wind);
    if w.site_elevation_m.is_some() || w.air_temperature_c.is_some() {
        let h = w.site_elevation_m.unwrap_or(0.0);
        let t = w.air_temperature_c.unwrap_or(15.0 - 0.0065 * h);
        spec = spec.with_air_density(stillsky::wind::air_density_kg_m3(h, t)?);
    }
    spec.validate()?;
    Ok(Some(spec))
}

fn ground_options(a: &GroundArgs, o: &mut ReportOptions) {
    match a.ground.as_deref() {
        Some("none") => o.ground_off = true,
        Some(g) => o.ground = Some(GroundSource::parse(g)),
        None => {}
    }
    if let Some(s) = a.ground_scale {
        o.ground_scale = s;
    }
    o.series = series_options(a.fs, a.sensitivity);
    o.sensor = a.sensor.clone();
}

/// The sky grid the options ask for: None for the rig's default.
fn sky_grid(model: &Path, a: &SkyGridArgs) -> Result<Option<SkyGrid>, Failure> {
    let axis = |name: &str, r: Option<[f64; 3]>, scale: f64| {
        r.map(|r| stepped(name, r[0] * scale, r[1] * scale, r[2] * scale)).transpose()
    };
    let axes = SkyAxes {
        altitude_deg: axis("altitudes", a.altitudes, 1.0)?,
        azimuth_deg: axis("azimuths", a.azimuths, 1.0)?,
        hour_angle_deg: axis("hour_angles_h", a.hour_angles_h, 15.0)?,
        declination_deg: axis("declinations", a.declinations, 1.0)?,
        min_altitude_deg: a.min_altitude_deg,
    };
    if axes == SkyAxes::default() {
        return Ok(None);
    }
    Ok(Some(SkyGrid::for_file(&ModelFile::read(model)?, &axes)?))
}

fn sky_map(a: &SkyMapArgs) -> CliResult {
    let mut o = ReportOptions::new()?;
    ground_options(&a.ground, &mut o);
    o.wind = wind_spec(&a.wind)?;
    o.wind_from_deg = a.wind.wind_from_deg;
    o.focal_length_mm = a.focal_length_mm;
    o.pixel_um = a.pixel_um;
    let file = ModelFile::read(&a.model)?;
    let grid = sky_grid(&a.model, &a.sky)?;
    let m = batch::report_sky_map(&file, grid.as_ref(), &o)?;
    write_sky_map(&a.model, &m, a.csv.as_deref(), a.svg.as_deref(), a.json.as_deref())
}

/// Print the sky map's summary and write its CSV, SVG and JSON.
fn write_sky_map(
    model: &Path,
    m: &stillsky::skymap::SkyMap,
    csv: Option<&Path>,
    svg: Option<&Path>,
    json: Option<&Path>,
) -> CliResult {
    let [rn, cn] = m.frame.axis_names();
    println!(
        "== sky map: {} ({} {} × {} {}; below {}° altitude not mapped) ==",
        model.display(),
        m.rows_deg.len(),
        rn,
        m.cols_deg.len(),
        cn,
        m.min_altitude_deg
    );
    println!("{}", m.summary_text());
    if let Some(t) = m.pier_side_text() {
        println!("{t}");
    }
    if let Some(p) = csv {
        stillsky::io::atomic::write_atomic(p, m.csv_text().as_bytes())?;
        println!("csv: {}", p.display());
    }
    if let Some(p) = svg {
        let plot = plots::sky_map_svg(m).map_err(|e| Failure::io("plots", e))?;
        stillsky::io::atomic::write_atomic(p, plot.svg.as_bytes())?;
        println!("svg: {}", p.display());
    }
    if let Some(p) = json {
        let text = serde_json::to_string_pretty(m).map_err(|e| Failure::io("json", e))?;
        stillsky::io::atomic::write_atomic(p, text.as_bytes())?;
        println!("json: {}", p.display());
    }
    Ok(())
}

fn report_options(a: &ReportArgs) -> Result<ReportOptions, Failure> {
    let mut o = ReportOptions::new()?;
    ground_options(&a.ground, &mut o);
    o.wind = wind_spec(&a.wind)?;
    o.wind_from_deg = a.wind.wind_from_deg;
    let grid = sky_grid(&a.model, &a.sky)?;
    if a.sky_map || grid.is_some() {
        o.sky_map = Some(grid);
    }
    o.people = people_options(&a.person, None, stillsky::people::DEFAULT_LIMIT_PX)?;
    o.focal_length_mm = a.focal_length_mm;
    o.pixel_um = a.pixel_um;
    o.seeing_fwhm_arcsec = a.seeing_arcsec;
    o.exposure_s = a.exposure_s;
    if let (Some(cadence_s), Some(gain)) = (a.guide_cadence_s, a.guide_gain) {
        let mut g = GuideLoop::new(cadence_s, gain);
        if let Some(t) = a.guide_exposure_s {
            g = g.with_exposure(t);
        }
        if let Some(t) = a.guide_latency_s {
            g = g.with_latency(t);
        }
        if let Some(k) = a.guide_proportional_gain {
            g = g.with_proportional_gain(k);
        }
        o.guide_loop = Some(g);
    }
    o.aperture_mm = a.aperture_mm;
    o.wavelength_nm = a.wavelength_nm;
    o.tones = a.tones.iter().map(|t| stillsky::tonal::ToneLine::parse(t)).collect::<Result<_, _>>()?;
    if let Some(d) = &a.ground_distance_m {
        use stillsky::distance_attenuation::{GroundPath, GroundPathSpec};
        let (from_m, to_m) = GroundPath::parse_distances(d)?;
        o.ground_path = Some(GroundPathSpec {
            from_m,
            to_m,
            spreading: GroundPath::spreading_of(&a.wave_kind)?,
            loss_factor: a.soil_loss_factor,
            wave_speed_m_s: a.soil_wave_speed_m_s,
        });
    }
    Ok(o)
}

/// What a report run computed, for the HTML page.
struct ReportRun {
    report: batch::Report,
    title: Option<String>,
    checks: Option<(StaticWind, CheckReport)>,
}

fn run_report(
    model: &Path,
    pointing: &Pointing,
    o: &ReportOptions,
    catalogue: Option<&Path>,
    plots: Option<&Path>,
    json: Option<&Path>,
) -> Result<ReportRun, Failure> {
    let mut file = ModelFile::read(model)?;
    file.repoint(pointing)?;
    let mut o = o.clone();
    if o.wind.is_some() {
        let cat = catalogue.map(batch::Catalogue::read).transpose()?;
        o.alternatives = batch::pad_alternatives(&file, cat.as_ref(), batch::DEFAULT_PAD_PREFIX)?;
    }
    let r = batch::build_file_report(&file, &o)?;
    print!("{}", print::report_text(&model.display().to_string(), &r));
    let mut checks = None;
    if file.rig.tripod.is_some() || file.rig.pier.is_some() {
        let wind = StaticWind::default();
        let c = stillsky::checks::rig_checks(&file, &wind, &Default::default())?;
        print!("{}", print::checks_text(&wind, &c));
        checks = Some((wind, c));
    }
    if let Some(dir) = plots {
        std::fs::create_dir_all(dir).map_err(|e| Failure::io(&dir.display().to_string(), e))?;
        let written = plots::report_plots(&r, dir).map_err(|e| Failure::io("plots", e))?;
        for p in written {
            println!("plot: {}", p.display());
        }
    }
    if let Some(j) = json {
        let text = serde_json::to_string_pretty(&r).map_err(|e| Failure::io("json", e))?;
        stillsky::io::atomic::write_atomic(j, text.as_bytes())?;
        println!("json: {}", j.display());
    }
    Ok(ReportRun { report: r, title: file.title.clone(), checks })
}

/// Write the report page (with a sweep run alongside, as in the demo).
fn write_report_html(
    path: &Path,
    model: &Path,
    o: &ReportOptions,
    run: &ReportRun,
    sweep: Option<&batch::SweepOutcome>,
) -> CliResult {
    let plot_err = |e| Failure::io("plots", e);
    let plots = plots::report_svgs(&run.report).map_err(plot_err)?;
    let sweep_plots = match sweep {
        Some(s) => sweep_svgs(s)?,
        None => Vec::new(),
    };
    let model_path = model.display().to_string();
    let inputs = html::report_inputs(&model_path, o, &run.report, run.checks.as_ref().map(|(w, _)| w));
    let page = html::report_page(&html::ReportContent {
        model_path: &model_path,
        model_title: run.title.as_deref(),
        report: &run.report,
        plots: &plots,
        checks: run.checks.as_ref().map(|(w, c)| (w, c)),
        inputs: &inputs,
        sweep: sweep.map(|s| (s, sweep_plots.as_slice())),
    });
    stillsky::io::atomic::write_atomic(path, page.as_bytes())?;
    println!("html: {}", path.display());
    Ok(())
}

fn sweep_svgs(s: &batch::SweepOutcome) -> Result<Vec<plots::Plot>, Failure> {
    s.summary
        .per_wind
        .iter()
        .filter(|t| !t.entries.is_empty())
        .map(|t| plots::ranking_svg(t).map_err(|e| Failure::io("plots", e)))
        .collect()
}

fn report(a: &ReportArgs) -> CliResult {
    let o = report_options(a)?;
    let pointing = Pointing {
        altitude_deg: a.altitude_deg,
        azimuth_deg: a.azimuth_deg,
        hour_angle_deg: a.hour_angle_deg,
        declination_deg: a.declination_deg,
        pier_side: a.pier_side,
        wind_from_deg: a.wind.wind_from_deg,
    };
    let run =
        run_report(&a.model, &pointing, &o, a.catalogue.as_deref(), a.plots.as_deref(), a.json.as_deref())?;
    if let Some(h) = &a.html {
        write_report_html(h, &a.model, &o, &run, None)?;
    }
    Ok(())
}

/// Expand folders into their files (sorted), keep other arguments.
fn ground_sources(args: &[String]) -> Result<Vec<GroundSource>, Failure> {
    let mut out = Vec::new();
    for a in args {
        let p = Path::new(a);
        if p.is_dir() {
            let mut files: Vec<PathBuf> = std::fs::read_dir(p)
                .map_err(|e| Failure::io(a, e))?
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|f| f.is_file())
                .collect();
            files.sort();
            if files.is_empty() {
                return Err(Failure { code: 2, message: format!("{a}: the folder holds no files") });
            }
            out.extend(files.iter().map(|f| GroundSource::parse(&f.display().to_string())));
        } else {
            out.push(GroundSource::parse(a));
        }
    }
    Ok(out)
}

struct SweepRun<'a> {
    model: &'a Path,
    catalogue: &'a Path,
    grounds: Vec<GroundSource>,
    winds: Vec<WindCase>,
    out: &'a Path,
    resume: bool,
    cfg: SweepConfig,
}

fn run_sweep(s: &SweepRun) -> Result<batch::SweepOutcome, Failure> {
    let file = ModelFile::read(s.model)?;
    let cat = Catalogue::read(s.catalogue)?;
    let inputs = SweepInputs { model: &file, catalogue: &cat, grounds: &s.grounds, winds: &s.winds };
    let tty = std::io::stderr().is_terminal();
    let bar = if tty {
        let b = indicatif::ProgressBar::new(0);
        b.set_style(
            indicatif::ProgressStyle::with_template("{bar:40} {pos}/{len} rows  {elapsed}")
                .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        b
    } else {
        indicatif::ProgressBar::hidden()
    };
    let progress = |p: batch::SweepProgress| {
        bar.set_length(p.total as u64);
        bar.set_position(p.done as u64);
    };
    let outcome = batch::run_sweep(&inputs, &s.cfg, s.out, s.resume, &progress)?;
    bar.finish_and_clear();
    print!("{}", print::sweep_text(&outcome));
    Ok(outcome)
}

/// Exit code 1 when rows failed (after everything was written to `path`).
fn row_failures(n_failed: usize, path: &std::path::Path) -> CliResult {
    if n_failed > 0 {
        return Err(Failure {
            code: 1,
            message: format!("{n_failed} row(s) failed; see the error rows in {}", path.display()),
        });
    }
    Ok(())
}

/// The inputs and defaults of a sweep run, for the page's last table.
fn sweep_inputs(s: &SweepRun) -> Vec<(String, String)> {
    vec![
        ("program".into(), format!("stillsky {}", env!("CARGO_PKG_VERSION"))),
        ("model file".into(), s.model.display().to_string()),
        ("isolator catalogue".into(), s.catalogue.display().to_string()),
        ("ground spectra".into(), s.grounds.iter().map(|g| format!("{g:?}")).collect::<Vec<_>>().join("; ")),
        (
            "wind cases".into(),
            s.winds.iter().map(|w| format!("{}: {:?}", w.label, w.wind)).collect::<Vec<_>>().join("; "),
        ),
        ("output CSV".into(), s.out.display().to_string()),
        ("resume".into(), s.resume.to_string()),
        ("frequency grid".into(), html::grid_text(s.cfg.grid.hz())),
        ("ground scale x, y, z".into(), format!("{:?}", s.cfg.ground_scale)),
        ("pad prefix (generic models)".into(), s.cfg.pad_prefix.clone()),
        ("temperature (°C)".into(), format!("{}", s.cfg.temperature_c)),
        ("recording options".into(), format!("{:?}", s.cfg.series)),
    ]
}

fn sweep(a: &SweepArgs) -> CliResult {
    let mut cfg = SweepConfig::new()?.with_pad_prefix(a.pad_prefix.clone());
    if let Some(s) = a.ground_scale {
        cfg = cfg.with_ground_scale(s);
    }
    cfg.series = series_options(a.fs, a.sensitivity);
    cfg = cfg.with_temperature_c(a.temperature_c);
    let winds = a.wind.iter().map(|w| WindCase::parse(w)).collect::<Result<Vec<_>, _>>()?;
    let grounds = ground_sources(&a.ground)?;
    if let Some(name) = &a.sensor {
        let curve = stillsky::sensor_response::NoiseCurve::preset(name)?;
        for g in &grounds {
            for w in g.load(&cfg.grid, cfg.ground_scale, &cfg.series)?.noise_floor_notes(&curve)? {
                eprintln!("warning: {w}");
            }
        }
    }
    let run = SweepRun {
        model: &a.model,
        catalogue: &a.catalogue,
        grounds,
        winds,
        out: &a.out,
        resume: a.resume,
        cfg,
    };
    let outcome = run_sweep(&run)?;
    if let Some(h) = &a.html {
        let plots = sweep_svgs(&outcome)?;
        let inputs = sweep_inputs(&run);
        let page =
            html::sweep_page(&html::SweepContent { outcome: &outcome, plots: &plots, inputs: &inputs });
        stillsky::io::atomic::write_atomic(h, page.as_bytes())?;
        println!("html: {}", h.display());
    }
    row_failures(outcome.failures().len(), &outcome.path)
}

fn study(a: &StudyArgs) -> CliResult {
    let st = batch::Study::read(&a.study)?;
    let outcome = batch::run_study(&st, &a.out, a.resume, a.threads, &|_| {})?;
    print!("{}", print::study_text(&st, &outcome));
    if let Some(dir) = &a.plots {
        std::fs::create_dir_all(dir).map_err(|e| Failure::io(&dir.display().to_string(), e))?;
        for p in plots::study_svgs(&st, &outcome.sensitivity).map_err(|e| Failure::io("plots", e))? {
            let path = dir.join(&p.file_name);
            stillsky::io::atomic::write_atomic(&path, p.svg.as_bytes())?;
            println!("plot: {} ({})", path.display(), p.title);
        }
    }
    row_failures(outcome.failures().len(), &outcome.path)
}

fn expand(model: &Path) -> CliResult {
    let file = ModelFile::read(model)?;
    print!("{}", stillsky::schema::spec_to_toml(&file.expanded()?)?);
    Ok(())
}

/// The bundled demo folder.
fn examples_dir() -> PathBuf {
    if let Some(d) = std::env::var_os("STILLSKY_EXAMPLES") {
        return PathBuf::from(d);
    }
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("docs").join("examples")
}

fn demo(out: &Path) -> CliResult {
    let ex = examples_dir();
    let rec = |n: &str| ex.join("recordings").join(n);
    std::fs::create_dir_all(out).map_err(|e| Failure::io(&out.display().to_string(), e))?;
    let model = ex.join("tripod-paver.toml");
    println!("== report: {} on the quiet-night recording, 4 m/s wind ==", model.display());
    let mut o = ReportOptions::new()?;
    o.ground = Some(GroundSource::Recording(rec("quiet-night.csv")));
    o.wind = Some(WindSpec::new(WindSpectrum::Kaimal, 4.0, 2.0, Turbulence::Intensity(0.2)));
    o.exposure_s = Some(2.0);
    o.sky_map = Some(None);
    let catalogue = ex.join("isolators.toml");
    let report_run = run_report(
        &model,
        &Pointing::default(),
        &o,
        Some(&catalogue),
        Some(&out.join("plots")),
        Some(&out.join("report.json")),
    )?;
    println!();
    println!("== sweep: isolators × three recordings × (calm, 4 m/s) ==");
    let grounds = ["quiet-night.csv", "road-nearby.csv", "footsteps.csv"]
        .iter()
        .map(|n| GroundSource::Recording(rec(n)))
        .collect();
    let outcome = run_sweep(&SweepRun {
        model: &model,
        catalogue: &catalogue,
        grounds,
        winds: vec![WindCase::calm(), WindCase::parse("4")?],
        out: &out.join("sweep.csv"),
        resume: false,
        cfg: SweepConfig::new()?,
    })?;
    println!("sweep: {}", out.join("sweep.csv").display());
    println!();
    let eq = ex.join("equatorial-pier.toml");
    let mut eo = ReportOptions::new()?;
    eo.ground = Some(GroundSource::Recording(rec("quiet-night.csv")));
    eo.wind = o.wind.clone();
    eo.wind_from_deg = Some(270.0);
    let m = batch::report_sky_map(&ModelFile::read(&eq)?, None, &eo)?;
    write_sky_map(
        &eq,
        &m,
        Some(&out.join("sky-map-equatorial.csv")),
        Some(&out.join("sky-map-equatorial.svg")),
        None,
    )?;
    write_report_html(&out.join("report.html"), &model, &o, &report_run, Some(&outcome))?;
    row_failures(outcome.failures().len(), &outcome.path)
}

/// The chosen axis of a recording (default the first).
fn recording_axis(
    file: &Path,
    fs: Option<f64>,
    axis: Option<&str>,
) -> Result<(String, Vec<f64>, f64), Failure> {
    let s = read_whole(file, &series_options(fs, None))?;
    let (name, x) = pick_axis(&s, file, axis)?;
    Ok((name, x.to_vec(), s.fs_hz))
}

/// A recording read whole; one too long for that gets the remedy a command-line user has.
fn read_whole(file: &Path, o: &SeriesOptions) -> Result<stillsky::io::series::Series, Failure> {
    read_series(file, o).map_err(|e| match e {
        stillsky::Error::TooLarge { value, limit, .. } => Failure {
            code: 2,
            message: format!(
                "{}: {value} samples (all axes) are more than the {limit} this command reads at once; cut the recording to the stretch of interest first",
                file.display()
            ),
        },
        e => e.into(),
    })
}

/// The axis named `axis` (a column name, or a miniSEED channel id or code) or the first.
fn pick_axis<'a>(
    s: &'a stillsky::io::series::Series,
    file: &Path,
    axis: Option<&str>,
) -> Result<(String, &'a [f64]), Failure> {
    match axis {
        Some(a) => Ok((
            a.to_string(),
            s.axis_by_name(a).ok_or_else(|| Failure {
                code: 2,
                message: format!("{}: no axis '{a}'; the file has {:?}", file.display(), s.axis_names),
            })?,
        )),
        None => Ok((s.axis_names.first().cloned().unwrap_or_default(), s.axis(0).unwrap_or_default())),
    }
}

fn parse_full_scale(s: &str) -> Result<stillsky::io::series::PhysicalValue, String> {
    let (v, u) = s.split_once(':').ok_or_else(|| format!("expected VALUE:UNIT (e.g. 2:g), got '{s}'"))?;
    let value: f64 = v.trim().parse().map_err(|_| format!("full scale '{v}' is not a number"))?;
    let unit = Unit::parse(u).map_err(|e| e.to_string())?;
    Ok(stillsky::io::series::PhysicalValue::new(value, unit))
}

/// One tap recording read for the card: axis name, samples, rate and unit symbol.
fn tap_recording(
    a: &TapArgs,
    file: &Path,
    plate: Option<f64>,
) -> Result<(String, Vec<f64>, f64, String), Failure> {
    let mut o = series_options(a.fs, a.sensitivity);
    o.wav_full_scale = a.full_scale;
    o.plate_scale_arcsec_per_px = plate;
    let s = read_whole(file, &o)?;
    let (name, x) = pick_axis(&s, file, a.axis.as_deref())?;
    let image = s.quantity == stillsky::io::series::SeriesQuantity::ImageAngle;
    let unit = if image { "arcsec".to_string() } else { s.quantity.si_unit().to_string() };
    Ok((name, x.to_vec(), s.fs_hz, unit))
}

fn tap(a: &TapArgs) -> CliResult {
    use stillsky::identify::{CardOptions, compare_cards, ringdown_card};
    let plate = match (a.plate_scale, a.focal_length_mm, a.pixel_um) {
        (Some(p), _, _) => Some(p),
        (None, Some(f), Some(px)) => Some(stillsky::image::plate_scale_arcsec_per_px(px, f)),
        _ => None,
    };
    let mut cards = Vec::new();
    for file in std::iter::once(&a.file).chain(a.compare.as_ref()) {
        let (name, x, fs_hz, unit) = tap_recording(a, file, plate)?;
        let mut o = CardOptions::default();
        // The plate scale belongs to image tracks only.
        o.plate_scale_arcsec_per_px = plate.filter(|_| unit == "arcsec");
        o.threshold = match (a.threshold, a.threshold_px, o.plate_scale_arcsec_per_px) {
            (Some(t), _, _) => Some(t),
            (None, Some(t), Some(p)) => Some(t * p),
            (None, Some(_), None) => {
                return Err(Failure {
                    code: 2,
                    message: "--threshold-px needs an image track (px or arcsec) and a plate scale".into(),
                });
            }
            (None, None, _) => None,
        };
        let card = ringdown_card(&x, fs_hz, &o)?;
        print!("{}", print::card_text(&file.display().to_string(), &name, &unit, &card));
        cards.push((file.display().to_string(), x, unit, card));
    }
    if let [(_, _, _, b), (_, _, _, af)] = cards.as_slice() {
        print!("{}", print::card_comparison_text(&compare_cards(b, af)));
    }
    if let Some(p) = &a.svg {
        let traces: Vec<plots::CardTrace> = cards
            .iter()
            .map(|(f, x, unit, c)| plots::CardTrace { label: f.clone(), x, unit, card: c })
            .collect();
        let plot = plots::ringdown_card_svg(&traces).map_err(|e| Failure::io("plots", e))?;
        stillsky::io::atomic::write_atomic(p, plot.svg.as_bytes())?;
        println!("svg: {}", p.display());
    }
    if let Some(p) = &a.json {
        let all: Vec<&stillsky::identify::RingdownCard> = cards.iter().map(|c| &c.3).collect();
        let text = serde_json::to_string_pretty(&all).map_err(|e| Failure::io("json", e))?;
        stillsky::io::atomic::write_atomic(p, text.as_bytes())?;
        println!("json: {}", p.display());
    }
    Ok(())
}

fn quiet_hours(a: &QuietHoursArgs) -> CliResult {
    use stillsky::batch::{SurveyOptions, survey_recording};
    let model = match &a.model {
        Some(m) => Some(stillsky::model::Model::from_spec(&ModelFile::read(m)?.expanded()?)?),
        None => None,
    };
    let mut ppsd = stillsky::spectrum::PpsdConfig::default().with_block_s(a.block_s);
    ppsd.overlap = a.overlap;
    ppsd.bands_hz = if a.bands.is_empty() {
        vec![(1.0, 10.0)]
    } else {
        a.bands.iter().map(|b| parse_band(b)).collect::<Result<_, _>>()?
    };
    let mut series = series_options(a.fs, a.sensitivity);
    series.channel = a.channel.clone();
    let o = SurveyOptions { ppsd, series, grid: ReportOptions::new()?.grid };
    let s = survey_recording(&a.recording, model.as_ref(), &o)?;
    print!("{}", print::quiet_survey_text(&s));
    if let Some(dir) = &a.plots {
        std::fs::create_dir_all(dir).map_err(|e| Failure::io(&dir.display().to_string(), e))?;
        for p in plots::quiet_survey_svgs(&s).map_err(|e| Failure::io("plots", e))? {
            let path = dir.join(p.file_name);
            stillsky::io::atomic::write_atomic(&path, p.svg.as_bytes())?;
            println!("plot: {}", path.display());
        }
    }
    if let Some(p) = &a.json {
        let text = serde_json::to_string_pretty(&s).map_err(|e| Failure::io("json", e))?;
        stillsky::io::atomic::write_atomic(p, text.as_bytes())?;
        println!("json: {}", p.display());
    }
    Ok(())
}

fn parse_band(s: &str) -> Result<(f64, f64), Failure> {
    let bad = || Failure { code: 2, message: format!("--band: expected LO:HI in Hz (e.g. 1:10), got '{s}'") };
    let (lo, hi) = s.split_once(':').ok_or_else(bad)?;
    let (lo, hi): (f64, f64) = (lo.trim().parse().map_err(|_| bad())?, hi.trim().parse().map_err(|_| bad())?);
    if !(lo > 0.0 && hi > lo && hi.is_finite()) {
        return Err(bad());
    }
    Ok((lo, hi))
}

fn transfer(a: &TransferArgs) -> CliResult {
    use stillsky::spectrum::{WelchConfig, transfer_estimate};
    let (xn, x, fx) = recording_axis(&a.input, a.fs, a.input_axis.as_deref())?;
    let (yn, y, fy) = recording_axis(&a.output, a.fs, a.output_axis.as_deref())?;
    if (fx - fy).abs() > 1e-9 * fx {
        return Err(Failure {
            code: 2,
            message: format!("the two recordings have different sample rates ({fx} and {fy} Hz)"),
        });
    }
    let n = x.len().min(y.len());
    let nperseg = a.nperseg.unwrap_or_else(|| stillsky::batch::recording_nperseg(fx, n));
    let t = transfer_estimate(&x[..n], &y[..n], fx, &WelchConfig::new(nperseg))?;
    print!(
        "{}",
        print::transfer_text(
            &format!("{} '{xn}'", a.input.display()),
            &format!("{} '{yn}'", a.output.display()),
            n,
            fx,
            nperseg,
            &t
        )
    );
    if let Some(p) = &a.csv {
        stillsky::io::atomic::write_atomic(p, print::transfer_csv(&t).as_bytes())?;
        println!("csv: {}", p.display());
    }
    Ok(())
}

fn calibrate(a: &CalibrateArgs) -> CliResult {
    use stillsky::identify::{CalibrationOptions, ModalTarget, RingdownOptions, identify_ringdown};
    let label = a.model.display().to_string();
    let text = stillsky::io::read_text_capped(&a.model, stillsky::schema::MAX_MODEL_FILE_BYTES)?;
    let mut targets = a.targets.clone();
    if let Some(tap) = &a.tap {
        let (name, x, fs_hz) = recording_axis(tap, a.fs, a.axis.as_deref())?;
        let id = identify_ringdown(&x, fs_hz, &RingdownOptions::default())?;
        print!("{}", print::tap_text(&tap.display().to_string(), &name, fs_hz, &id));
        targets.extend(id.frequency_hz.iter().map(|&f| ModalTarget::frequency(f)));
    }
    if targets.is_empty() {
        return Err(Failure {
            code: 2,
            message: "no targets: give --target FREQ_HZ[:ZETA] or --tap FILE".into(),
        });
    }
    let mut opts = CalibrationOptions::default();
    opts.damping_weight = a.damping_weight;
    let c = stillsky::identify::calibrate(&text, &label, &a.params, &targets, &opts)?;
    print!("{}", print::calibration_text(&label, &c));
    if let Some(out) = &a.out {
        let body = format!(
            "# Calibrated from {label} by `stillsky calibrate` ({} value(s) fitted to measured modes).\n{}",
            c.paths.len(),
            c.model_toml
        );
        stillsky::io::atomic::write_atomic(out, body.as_bytes())?;
        println!("fitted model written to {}", out.display());
    }
    Ok(())
}

fn people_options(
    p: &PersonArgs,
    distances_m: Option<&[f64]>,
    limit_px: f64,
) -> Result<batch::PeopleOptions, Failure> {
    use stillsky::people::{FootfallModel, PassOptions, Walker};
    let mut o = batch::PeopleOptions::new()?;
    o.walker = Walker {
        pace_hz: p.pace_hz,
        model: FootfallModel::parse(&p.footfall)?,
        ..Walker::of_mass(p.person_kg)?
    };
    o.walk_at_m = [p.walk_at_m[0], p.walk_at_m[1]];
    o.pass = PassOptions { duration_s: p.walk_s, ..PassOptions::default() };
    if let Some(d) = distances_m {
        o.distances_m = d.to_vec();
    }
    o.limit_px = limit_px;
    Ok(o)
}

fn deck_load(a: &DeckLoadArgs) -> CliResult {
    let mut o = ReportOptions::new()?;
    o.people = people_options(&a.person, a.distances_m.as_deref(), a.limit_px)?;
    let p = batch::file_people_report(&ModelFile::read(&a.model)?, &o)?;
    print!("{}", print::people_text(&p));
    if let Some(path) = &a.csv {
        stillsky::io::atomic::write_atomic(path, p.standing.csv_text().as_bytes())?;
        println!("CSV written to {}", path.display());
    }
    Ok(())
}

fn pier_table(a: &PierTableArgs) -> CliResult {
    use stillsky::pier_table::{PierFooting, PierTableSpec};
    let mut spec = PierTableSpec::new(a.od.clone(), a.wall.clone(), a.height.clone(), a.material.clone());
    spec.fill_density_kg_m3 = a.fill_density;
    spec.load_n = a.load_n;
    spec.top_mass_kg = a.top_mass_kg;
    spec.top_inertia_kgm2 = a.top_inertia_kgm2;
    spec.footing = match (a.rocking_nm_per_rad, &a.soil, a.footing_diameter) {
        (Some(k), _, _) => PierFooting::Rocking { stiffness_nm_per_rad: k },
        (None, Some(s), Some(d)) => {
            PierFooting::Soil { soil: stillsky::soil::Soil::preset(s)?, diameter_m: d }
        }
        _ => PierFooting::Rigid,
    };
    let rows = stillsky::pier_table::pier_table(&spec)?;
    print!("{}", print::pier_table_text(&spec, &rows));
    if let Some(p) = &a.csv {
        stillsky::io::atomic::write_atomic(p, stillsky::pier_table::csv_text(&rows).as_bytes())?;
        println!("CSV written to {}", p.display());
    }
    Ok(())
}

fn check(
    model: &Path,
    speed_m_s: f64,
    gust_factor: f64,
    options: &stillsky::checks::StaticOptions,
) -> CliResult {
    let file = ModelFile::read(model)?;
    let wind = stillsky::checks::StaticWind { speed_m_s, gust_factor, ..Default::default() };
    let c = stillsky::checks::rig_checks(&file, &wind, options)?;
    println!("== static checks: {} ==", model.display());
    print!("{}", print::checks_text(&wind, &c));
    if c.verdict() == stillsky::checks::Verdict::Fail {
        return Err(Failure { code: 1, message: "at least one static check fails".into() });
    }
    Ok(())
}
