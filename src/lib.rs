//! starsift: triage of transiting-exoplanet candidate catalogues with live
//! multiplicity odds.
//!
//! Map of the modules:
//! - [`catalogue`]: loading CSV/TSV(.gz) catalogues into columnar storage
//!   indexed by host star.
//! - [`constants`] and [`science`]: constants with sources; transit physics.
//! - [`survey`]: survey facts (targets searched, false-positive fraction).
//! - [`odds`]: the multiplicity odds model and its live, incremental state.
//! - [`demo`]: the built-in invented demo survey and its generator.
//! - [`sanitize`]: making input text safe to print.
//! - [`output`]: tables, CSV and JSON for people and scripts.
//! - [`checks`], [`lightcurve`], [`transit_model`]: vetting diagnostics.
//! - [`ledger`]: the durable SQLite record of decisions.
//! - [`query`]: the filter syntax; [`selection`]: what a filter selects
//!   (candidates as the filter sees them, shared by the browser and `--where`).
//! - [`tui`]: the terminal browser, a thin shell over the core.
//! - [`session`]: one catalogue with all its evidence (checks, light curves,
//!   ledger) and the live odds; every command's verdicts come from it.
//! - [`cli`] and [`cmd`]: the command line; one file per command.
//! - [`parallel`] and [`prefetch`]: work split over threads; rows asked of
//!   memory ahead of loops that read them out of file order; [`sorted`]:
//!   searches of sorted lists from a likely place.
//!
//! The core (`catalogue`, `survey`, `odds`) knows nothing of terminals.

pub mod catalogue;
pub mod checks;
pub mod cli;
pub mod cmd;
pub mod constants;
pub mod contain;
pub mod decision;
pub mod demo;
pub mod figure;
pub mod fingerprint;
pub mod fitsfile;
pub mod flags;
pub mod ledger;
pub mod lightcurve;
pub mod odds;
pub mod output;
pub mod parallel;
pub mod prefetch;
pub mod query;
pub mod sanitize;
pub mod science;
pub mod selection;
pub mod session;
pub mod sorted;
pub mod survey;
pub mod transit_model;
pub mod tui;
