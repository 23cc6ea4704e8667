//! The `pinlow` binary: parse the command line, run, turn the outcome into an exit code.

use std::io::Write;
use std::process::ExitCode;

use clap::Parser;
use pinlow::app::{run, terminal_facts, OUTPUT_CLOSED_EXIT};
use pinlow::cli::Cli;
use pinlow::Error;

fn main() -> ExitCode {
    let cli = Cli::parse();
    let (tty, no_color) = terminal_facts();
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    let result = run(
        &cli,
        std::env::var_os("PINLOW_PARTS").as_deref(),
        tty,
        no_color,
        &mut out,
    );
    let flushed = out.flush();
    let closed = |e: &std::io::Error| e.kind() == std::io::ErrorKind::BrokenPipe;
    match (result, flushed) {
        // The reader of standard output went away: end quietly, as SIGPIPE would.
        (Err(Error::OutputClosed), _) => ExitCode::from(OUTPUT_CLOSED_EXIT),
        (Ok(_), Err(e)) if closed(&e) => ExitCode::from(OUTPUT_CLOSED_EXIT),
        (Ok(code), Ok(())) => ExitCode::from(code),
        (Ok(_), Err(e)) => {
            eprintln!("pinlow: error: <standard output>: cannot write: {e}");
            ExitCode::from(2)
        }
        (Err(err), _) => {
            eprintln!("pinlow: error: {err}");
            ExitCode::from(2)
        }
    }
}
