//! The JSON renderer (files.md): the head opens the object, each stage is one element of
//! `stages`, and the tail closes it with the verdict and the cautions.

use serde::Serialize;

use super::model::StageReport;
use super::model::MODEL_VERSION;
use super::stream::{Head, Renderer, Tail};

/// Renders a report as pretty-printed JSON, one stage at a time.
#[derive(Clone, Copy, Debug, Default)]
pub struct JsonRenderer {
    stages_written: usize,
}

/// Pretty JSON of a value, every line after the first indented by `indent` spaces.
fn pretty<T: Serialize>(value: &T, indent: usize) -> String {
    // Plain structs of strings, numbers and options always serialise; say so in the output
    // rather than panic if that ever changes.
    super::escape::json_pretty_at(value, indent)
        .unwrap_or_else(|e| format!("{{\"error\": {:?}}}", e.to_string()))
}

impl Renderer for JsonRenderer {
    fn head(&mut self, head: &Head) -> String {
        self.stages_written = 0;
        format!(
            "{{\n  \"board\": {},\n  \"model_version\": {},\n  \"stages\": [",
            pretty(&head.board, 2),
            MODEL_VERSION
        )
    }

    fn stage(&mut self, stage: &StageReport) -> String {
        let sep = if self.stages_written == 0 { "" } else { "," };
        self.stages_written += 1;
        format!("{sep}\n    {}", pretty(stage, 4))
    }

    fn tail(&mut self, tail: &Tail) -> String {
        let (pass, marginal, fail) = tail.counts;
        let close = if self.stages_written == 0 {
            "]"
        } else {
            "\n  ]"
        };
        format!(
            "{close},\n  \"verdict\": {},\n  \"counts\": {{ \"pass\": {pass}, \"marginal\": {marginal}, \"fail\": {fail} }},\n  \"cautions\": {}\n}}\n",
            pretty(&tail.verdict, 2),
            pretty(&tail.cautions, 2)
        )
    }

    fn wants_summary(&self) -> bool {
        false
    }
}
