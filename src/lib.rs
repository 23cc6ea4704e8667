//! pinlow: sizes and audits NPN transistor switch stages driven from a logic pin.
//!
//! Data flows one way: typed input ([`stage::Stage`], built from flags or a board file by
//! [`board`]) goes into the engine ([`analysis::analyse`]), which returns one
//! [`report::StageReport`] per stage; the renderers in [`report`] turn a [`report::Report`] into a
//! table, JSON or Markdown and never compute anything themselves.

pub mod analysis;
pub mod app;
pub mod board;
pub mod cli;
pub mod error;
pub mod eseries;
pub mod jsonpos;
pub mod load;
pub mod parts;
pub mod plot;
pub mod quantity;
pub mod report;
pub mod stage;

pub use error::{Error, Result};
