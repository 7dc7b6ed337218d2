//! # Browser glue for Stagewright
//!
//! This crate is the thin layer between the page (`www/`) and the core crate
//! `stagewright`. It does three things and nothing else:
//!
//! * converts values between JavaScript and the core's types
//!   ([`parse_value`], [`format_si`], [`series_lookup`]);
//! * turns core errors into plain JavaScript objects `{field, message}` so the
//!   page can show each message next to the field it names;
//! * draws plots on canvases ([`plot_frequency`], [`plot_xy`]).
//!
//! It holds no circuit equation: every number the page shows comes from the
//! core. The plotting code only places given numbers on axes.
//!
//! Built with `scripts/build-web.sh` (plain `cargo build` for
//! `wasm32-unknown-unknown` followed by the `wasm-bindgen` CLI, target
//! `no-modules`, no wasm-opt).

mod js;
mod plot;
mod ticks;
mod values;

pub use plot::{plot_frequency, plot_xy};
pub use values::{format_si, parse_value, series_lookup, version};
