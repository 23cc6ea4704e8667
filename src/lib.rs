//! pinlow: sizes and audits low-side switch stages driven from a logic pin: an NPN transistor
//! (or Darlington pair) or a logic-level N-channel MOSFET pinning a load to ground.
//!
//! Data flows one way: typed input ([`stage::Stage`], built from flags or a board file by
//! [`board`]) goes into the engine ([`analysis::analyse`], one [`analysis::Analysis`] per stage,
//! for any drive kind of [`drive`] and load kind of [`load`]); [`pipeline::stage_report`] builds
//! the stage's [`report::StageReport`] (remedy, yield, picture) from that one analysis; the
//! renderers in [`report`] turn it into a table, JSON or Markdown and never compute anything
//! themselves.
//!
//! No user input may panic the library: outside tests, `unwrap`, `expect`, `panic!` and
//! unchecked indexing or string slicing are refused by the lints below.
#![cfg_attr(
    not(test),
    deny(
        clippy::unwrap_used,
        clippy::expect_used,
        clippy::panic,
        clippy::indexing_slicing,
        clippy::string_slice
    )
)]

pub mod analysis;
pub mod app;
pub mod board;
pub mod check;
pub mod cli;
pub mod conditions;
pub mod drive;
pub mod error;
pub mod eseries;
pub mod fields;
pub mod jsonpos;
pub mod load;
pub mod outputs;
pub mod parts;
pub mod pick;
pub mod picture;
pub mod pipeline;
pub mod plot;
pub mod quantity;
pub mod read;
pub mod remedy;
pub mod report;
pub mod schema;
pub mod shape;
pub mod stage;

pub use error::{Error, Result};
