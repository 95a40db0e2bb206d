//! C ABI over the `stillsky` core: opaque handles, numbered status codes, a thread-local last
//! error message and a panic boundary on every export. The header `include/stillsky.h` is
//! generated from this crate by cbindgen (see `tests/header.rs`) and is the C manual.
//!
//! Every export does four things: check its pointers, call one core function, map the error,
//! and copy the result into caller memory. Physics lives in the core crate.

mod error;
mod image;
mod model;
mod monitor;
mod people;
mod ringdown;
mod sensor;
mod status;

pub use error::{stillsky_last_error_message, stillsky_status_str, stillsky_version};
pub use image::{stillsky_image_motion, stillsky_image_motion_compute};
pub use model::{
    stillsky_complex, stillsky_frf_evaluate, stillsky_frf_evaluate_interleaved, stillsky_model,
    stillsky_model_dof_count, stillsky_model_free, stillsky_model_from_file, stillsky_model_from_toml,
    stillsky_modes_compute,
};
pub use monitor::{
    stillsky_exposure_quality, stillsky_monitor, stillsky_monitor_config, stillsky_monitor_config_default,
    stillsky_monitor_exposure_begin, stillsky_monitor_exposure_end, stillsky_monitor_free,
    stillsky_monitor_from_calibration, stillsky_monitor_from_model, stillsky_monitor_info,
    stillsky_monitor_info_get, stillsky_monitor_push, stillsky_monitor_reading, stillsky_monitor_reset,
    stillsky_monitor_state, stillsky_monitor_tick, stillsky_unsafe_reason,
};
pub use people::{
    stillsky_footfall_force, stillsky_footfall_harmonics, stillsky_footfall_steady,
    stillsky_ground_distance_ratio, stillsky_standing_row, stillsky_standing_tilt, stillsky_tone_image,
    stillsky_tone_line_image, stillsky_walking_pass, stillsky_walking_pass_summary,
};
pub use ringdown::{stillsky_ringdown_card, stillsky_ringdown_card_summary};
pub use sensor::{stillsky_geophone_remove_psd, stillsky_geophone_response};
pub use status::{status_of, stillsky_status};

#[doc(hidden)]
pub use error::guard;
