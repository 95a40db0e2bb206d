//! Batch work: the isolator sweep and the one-model report that the command line prints.
//!
//! - [`sweep`]: every isolator of a [`Catalogue`] (plus the no-pad baseline) under every ground
//!   spectrum and wind case, one CSV row per combination ([`sweep_row`] defines the row);
//! - [`catalogue`]: isolator specs and how pads enter a model; [`ground`]: ground spectra from
//!   recordings, PSD files or reference curves; [`gust`]: the gust family (worst peak, ring-down);
//! - [`quiet_survey`]: a quiet-hours survey of one long recording, read in chunks;
//! - [`spring_sets`]: alternatives that only replace springs, evaluated by the spring-variant
//!   engine without a model each (the sweep's fast path);
//! - [`ranking`]: the sweep's ranked summary and verdicts against no pad, per wind case;
//! - [`report`]: the one-model report (modes, image motion, gust, checks);
//! - [`study`]: design studies over model numbers, alternative model files and the isolator
//!   catalogue ([`study_file`] reads the study file).

pub mod catalogue;
pub mod ground;
pub mod gust;
pub mod quiet_survey;
pub mod ranking;
pub mod report;
pub mod spring_sets;
pub mod study;
pub mod study_file;
pub mod sweep;
pub mod sweep_row;

pub use catalogue::{
    Catalogue, DEFAULT_PAD_PREFIX, Isolator, NO_PAD, NOMINAL_TEMPERATURE_C, PadDirection, PadModel, PadSite,
    TemperatureTable,
};
pub use ground::{GroundSource, GroundSpectrum, recording_nperseg};
pub use gust::{
    GUST_START_S, GustCase, GustFamily, GustPlan, gust_amplitude_m_s, gust_durations, gust_family,
    gust_family_responses, gust_family_with,
};
pub use quiet_survey::{
    QuietSurvey, SURVEY_PERCENTILES, SurveyAxis, SurveyBlock, SurveyOptions, survey_recording,
};
pub use ranking::{RankEntry, RankTable, SweepSummary, Verdict, Visibility, summarize};
pub use report::{
    CriterionVerdict, Curve, GUST_RIG_LABEL, GustOutcome, GustReport, GustTrace, ModeRow, PeopleOptions,
    PeopleReport, Report, ReportOptions, build_file_report, build_report, file_people_report, report_sky_map,
};
pub use spring_sets::{ImageStats, SpringSets, spring_changes};
pub use study::{
    BASE, OUTCOMES, Sensitivity, StudyOutcome, StudyRankEntry, StudyRanking, StudyRow, StudySummary, Variant,
    evaluate_variant, read_study_csv, run_study, sensitivity, study_columns, study_csv_text, study_rows,
    study_rows_of, summarize_study, variants,
};
pub use study_file::{Combine, Study, StudySetting, StudySettings, Variable, VariableKind};
pub use sweep::{
    PadMechanism, SweepConfig, SweepEngine, SweepInputs, SweepOutcome, SweepProgress, WindCase, check_sweep,
    ground_labels, pad_alternatives, run_sweep, sweep_csv_text, sweep_rows, sweep_rows_labelled,
};
pub use sweep_row::{ColumnKind, SWEEP_COLUMNS, SWEEP_ROW, SweepRow, SweepValue, read_sweep_csv};
