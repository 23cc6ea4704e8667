//! The load flags, made from the load kinds' own field tables (`load::KINDS`): a new load kind
//! brings its flags with it. Several kinds may share a flag that means the same key
//! (`--inductance`, `--current`).

use clap::builder::{PossibleValuesParser, ValueParser};
use clap::{Arg, ArgAction, ArgMatches, Args, Command, FromArgMatches};

use crate::load::{Field, KINDS};
use crate::quantity::parse_value_in_span;

/// Every load field once per flag, in registry order, with the kinds that take it.
pub fn unique_fields() -> Vec<(&'static Field, Vec<&'static str>)> {
    let mut out: Vec<(&'static Field, Vec<&'static str>)> = Vec::new();
    for kind in KINDS {
        for f in kind.fields {
            match out.iter_mut().find(|(g, _)| g.flag == f.flag) {
                Some((_, kinds)) => kinds.push(kind.name),
                None => out.push((f, vec![kind.name])),
            }
        }
    }
    out
}

/// The parser of `--load`: one of the registered kind names.
pub fn load_kind_parser() -> PossibleValuesParser {
    PossibleValuesParser::new(
        KINDS
            .iter()
            .map(|k| clap::builder::PossibleValue::new(k.name).help(k.about)),
    )
}

fn id(flag: &str) -> &str {
    flag.trim_start_matches('-')
}

/// The load flags given: (flag, key, value) in registry order.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LoadFlags {
    /// What the user set.
    pub set: Vec<(&'static str, &'static str, f64)>,
}

impl FromArgMatches for LoadFlags {
    fn from_arg_matches(m: &ArgMatches) -> Result<Self, clap::Error> {
        let mut s = LoadFlags::default();
        s.update_from_arg_matches(m)?;
        Ok(s)
    }

    fn update_from_arg_matches(&mut self, m: &ArgMatches) -> Result<(), clap::Error> {
        for (f, _) in unique_fields() {
            if let Ok(Some(v)) = m.try_get_one::<f64>(id(f.flag)) {
                self.set.retain(|(flag, _, _)| *flag != f.flag);
                self.set.push((f.flag, f.key, *v));
            }
        }
        Ok(())
    }
}

impl Args for LoadFlags {
    fn augment_args(mut cmd: Command) -> Command {
        for (f, kinds) in unique_fields() {
            let kind = f.value;
            let parser = ValueParser::new(move |s: &str| parse_value_in_span(s, kind));
            cmd = cmd.arg(
                Arg::new(id(f.flag))
                    .long(id(f.flag))
                    .value_name(f.value_name)
                    .help(format!(
                        "{} [--load {}]",
                        capitalise(f.help),
                        kinds.join(", ")
                    ))
                    .value_parser(parser)
                    .action(ArgAction::Set)
                    .allow_hyphen_values(true)
                    .help_heading("Load"),
            );
        }
        cmd
    }

    fn augment_args_for_update(cmd: Command) -> Command {
        Self::augment_args(cmd)
    }
}

fn capitalise(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(first) => first.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}
