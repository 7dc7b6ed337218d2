//! # Browser glue for Stagewright
//!
//! This crate is the thin layer between the page (`www/`) and the core crate
//! `stagewright`. It does four things and nothing else:
//!
//! * converts values between JavaScript and the core's types
//!   ([`parse_value`], [`format_si`], [`series_lookup`]);
//! * turns core errors into plain JavaScript objects `{field, message}` so the
//!   page can show each message next to the field it names;
//! * runs the core's analysis of a design file and hands the page its
//!   report, frequency sweep and load lines ([`compute`], [`analyze`],
//!   [`presets`], [`preset_data`]), designs a specification
//!   ([`design_from_spec`]) and runs the tolerance analysis in chunks
//!   ([`Tolerance`]);
//! * draws plots on canvases ([`plot_frequency`], [`plot_xy`]).
//!
//! It holds no circuit equation: every number the page shows comes from the
//! core. The plotting code only places given numbers on axes.
//!
//! Built with `scripts/build-web.sh` (plain `cargo build` for
//! `wasm32-unknown-unknown` followed by the `wasm-bindgen` CLI, target
//! `no-modules`, no wasm-opt).

mod analysis;
mod js;
mod plot;
mod session;
mod spec;
mod tolerance;
mod values;

pub use analysis::{
    analyze, compute, fields, preset_data, presets, read_design_text, tables, unusual, utf8_text,
};
pub use plot::{plot_frequency, plot_xy};
pub use session::Session;
pub use spec::design_from_spec;
pub use tolerance::Tolerance;
pub use values::{format_exact, format_si, parse_value, series_lookup};

/// The allocator: a small free-list allocator in place of the standard
/// library's dlmalloc, about 3.5 KB less in the compressed page, which
/// keeps `dist/stagewright.html` within its gzip budget. The page
/// is single-threaded, and the engine's allocations are a few thousand
/// short-lived blocks per recompute, where a free list is quick.
#[cfg(target_arch = "wasm32")]
#[global_allocator]
static ALLOC: lol_alloc::AssumeSingleThreaded<lol_alloc::FreeListAllocator> =
    // SAFETY: wasm32-unknown-unknown without the atomics feature has one
    // thread, which is what AssumeSingleThreaded requires.
    unsafe { lol_alloc::AssumeSingleThreaded::new(lol_alloc::FreeListAllocator::new()) };
