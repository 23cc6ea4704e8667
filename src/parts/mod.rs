//! The parts library: part records (one JSON file a part), their validation, and the library that
//! merges the shipped parts with the user's folders.

mod library;
mod part;
mod record;
mod validate;

pub use library::{
    builtin_sources, check_file, check_paths, folder_files, Library, PartSource, PartsPath,
};
pub use part::{GainPoint, Part, VbeSatPoint, VceSatPoint};
pub use record::PartRecord;
pub use validate::part_from_record;
