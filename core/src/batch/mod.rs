//! Batch work: the isolator sweep and the one-model report that the command line prints.
//!
//! - [`sweep`]: every isolator of a [`Catalogue`] (plus the no-pad baseline) under every ground
//!   spectrum and wind case, one CSV row per combination ([`sweep_row`] defines the row);
//! - [`catalogue`]: isolator specs and how pads enter a model; [`ground`]: ground spectra from
//!   recordings, PSD files or reference curves; [`gust`]: the design gust;
//! - [`report`]: the one-model report (modes, image motion, gust, checks).

pub mod catalogue;
pub mod ground;
pub mod gust;
pub mod report;
pub mod sweep;
pub mod sweep_row;

pub use catalogue::{Catalogue, DEFAULT_PAD_PREFIX, Isolator, NO_PAD, PadDirection, PadModel, PadSite};
pub use ground::{GroundSource, GroundSpectrum};
pub use gust::{GUST_START_S, design_gust, design_gust_response};
pub use report::{CriterionVerdict, Curve, GustTrace, ModeRow, Report, ReportOptions, build_report};
pub use sweep::{
    PadMechanism, RankEntry, RankTable, SweepConfig, SweepInputs, SweepOutcome, SweepProgress, SweepSummary,
    WindCase, check_sweep, ground_labels, run_sweep, summarize, sweep_csv_text, sweep_rows,
    sweep_rows_labelled,
};
pub use sweep_row::{ColumnKind, SWEEP_COLUMNS, SWEEP_ROW, SweepRow, SweepValue, read_sweep_csv};
