//! `pinlow completions SHELL` and `pinlow man`: made from the clap definition of the command
//! line, so they always list the commands and flags that `--help` lists.

use std::io::Write;

use clap::CommandFactory;
use clap_complete::Shell;
use clap_mangen::roff::{roman, Roff};

use super::stdout_error;
use crate::cli::{Cli, ShellArg};
use crate::error::Result;

/// Width of the help text set into the manual page.
const MAN_WIDTH: usize = 78;

/// Print the completion script for `shell`.
pub(super) fn completions(shell: ShellArg, out: &mut dyn Write) -> Result<u8> {
    let shell = match shell {
        ShellArg::Bash => Shell::Bash,
        ShellArg::Zsh => Shell::Zsh,
        ShellArg::Fish => Shell::Fish,
        ShellArg::Powershell => Shell::PowerShell,
    };
    let mut cmd = Cli::command();
    let mut text = Vec::new();
    clap_complete::generate(shell, &mut cmd, "pinlow", &mut text);
    out.write_all(&text).map_err(stdout_error)?;
    Ok(0)
}

/// Print the manual page: the page of `pinlow` itself, with a COMMANDS section that holds the
/// full help of every command and subcommand in place of a list of pages of their own.
pub(super) fn man(out: &mut dyn Write) -> Result<u8> {
    let mut text = Vec::new();
    man_page(&mut text).map_err(stdout_error)?;
    out.write_all(&text).map_err(stdout_error)?;
    Ok(0)
}

fn man_page(w: &mut dyn Write) -> std::io::Result<()> {
    let mut cmd = Cli::command()
        .term_width(MAN_WIDTH)
        .max_term_width(MAN_WIDTH);
    cmd.build();
    let man = clap_mangen::Man::new(cmd.clone());
    let mut commands = Roff::new();
    commands.control("SH", ["COMMANDS"]);
    for sub in cmd.get_subcommands_mut() {
        command_section(&mut commands, "pinlow", sub);
    }
    type Section<'a> = Box<dyn Fn(&mut dyn Write) -> std::io::Result<()> + 'a>;
    let sections: [Section<'_>; 8] = [
        Box::new(|w| man.render_title(w)),
        Box::new(|w| man.render_name_section(w)),
        Box::new(|w| man.render_synopsis_section(w)),
        Box::new(|w| man.render_description_section(w)),
        Box::new(|w| man.render_options_section(w)),
        Box::new(|w| commands.to_writer(w)),
        Box::new(|w| man.render_extra_section(w)),
        Box::new(|w| man.render_version_section(w)),
    ];
    // Each section starts with the same preamble (it defines the apostrophe); it is written
    // once, at the top.
    let preamble = Roff::new().render();
    w.write_all(preamble.as_bytes())?;
    for section in sections {
        let mut buf = Vec::new();
        section(&mut buf)?;
        w.write_all(buf.strip_prefix(preamble.as_bytes()).unwrap_or(&buf))?;
    }
    Ok(())
}

/// A subsection for `cmd` (under `parent`) holding its full help as `--help` prints it, then
/// one for each of its own subcommands.
fn command_section(roff: &mut Roff, parent: &str, cmd: &mut clap::Command) {
    if cmd.get_name() == "help" {
        return;
    }
    let path = format!("{parent} {}", cmd.get_name());
    roff.control("SS", [path.as_str()]);
    roff.control("nf", []);
    let help = cmd.render_long_help().to_string();
    for line in help.trim_end().lines() {
        roff.text([roman(line)]);
    }
    roff.control("fi", []);
    for sub in cmd.get_subcommands_mut() {
        command_section(roff, &path, sub);
    }
}
