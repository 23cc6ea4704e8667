//! The `pinlow` binary: parse the command line, run, turn the outcome into an exit code.

use std::io::Write;
use std::process::ExitCode;

use clap::Parser;
use pinlow::app::{run, terminal_facts};
use pinlow::cli::Cli;

fn main() -> ExitCode {
    let cli = Cli::parse();
    let (tty, no_color) = terminal_facts();
    match run(
        &cli,
        std::env::var_os("PINLOW_PARTS").as_deref(),
        tty,
        no_color,
    ) {
        Ok(outcome) => {
            let mut out = std::io::stdout().lock();
            if out
                .write_all(outcome.stdout.as_bytes())
                .and_then(|_| out.flush())
                .is_err()
            {
                return ExitCode::from(2);
            }
            ExitCode::from(outcome.code)
        }
        Err(err) => {
            eprintln!("pinlow: error: {err}");
            ExitCode::from(2)
        }
    }
}
