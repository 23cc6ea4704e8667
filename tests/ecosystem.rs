//! Shell completions, the manual page and `--version`: generated from the clap definition, so
//! every command the command line has must appear in each of them.

use assert_cmd::Command;
use clap::CommandFactory;
use pinlow::cli::Cli;
use pinlow::parts::Library;
use pinlow::report::MODEL_VERSION;

fn pinlow(args: &[&str]) -> (i32, String, String) {
    let out = Command::cargo_bin("pinlow")
        .expect("binary")
        .args(args)
        .output()
        .expect("run");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// Every command path of the command line (`["parts", "list"]`), walked from the clap
/// definition; clap's own `help` command is left out.
fn command_paths() -> Vec<Vec<String>> {
    fn walk(cmd: &clap::Command, path: &[String], out: &mut Vec<Vec<String>>) {
        for sub in cmd.get_subcommands().filter(|s| s.get_name() != "help") {
            let mut p = path.to_vec();
            p.push(sub.get_name().to_string());
            out.push(p.clone());
            walk(sub, &p, out);
        }
    }
    let mut out = Vec::new();
    let mut cmd = Cli::command();
    cmd.build();
    walk(&cmd, &[], &mut out);
    out
}

#[test]
fn the_walk_finds_the_nested_commands() {
    let paths = command_paths();
    assert!(paths.len() >= 10, "{paths:?}");
    assert!(paths.contains(&vec!["parts".to_string(), "check".to_string()]));
    assert!(paths.contains(&vec!["completions".to_string()]));
}

#[test]
fn each_shell_gets_a_completion_script_naming_every_command() {
    for shell in ["bash", "zsh", "fish", "powershell"] {
        let (code, script, err) = pinlow(&["completions", shell]);
        assert_eq!(code, 0, "{shell}: {err}");
        for path in command_paths() {
            let name = path.last().expect("a name");
            // Each generator names a command in its own way.
            let needle = match shell {
                "bash" => format!("pinlow__subcmd__{}", path.join("__subcmd__")),
                "zsh" => format!("'{name}:"),
                "fish" => format!("-a \"{name}\""),
                _ => format!("'pinlow;{}'", path.join(";")),
            };
            assert!(
                script.contains(&needle),
                "{shell}: `{}` not found as {needle}",
                path.join(" ")
            );
        }
    }
    let (code, _, err) = pinlow(&["completions", "tcsh"]);
    assert_eq!(code, 2, "{err}");
}

#[test]
fn the_bash_script_is_valid_bash() {
    let Ok(bash) = which("bash") else {
        eprintln!("bash not found: syntax check skipped");
        return;
    };
    let (_, script, _) = pinlow(&["completions", "bash"]);
    let dir = tempfile::tempdir().expect("temp");
    let file = dir.path().join("pinlow.bash");
    std::fs::write(&file, script).expect("write");
    let status = std::process::Command::new(bash)
        .arg("-n")
        .arg(&file)
        .status()
        .expect("bash");
    assert!(status.success());
}

fn which(name: &str) -> Result<std::path::PathBuf, ()> {
    std::env::var_os("PATH")
        .into_iter()
        .flat_map(|p| std::env::split_paths(&p).collect::<Vec<_>>())
        .map(|d| d.join(name))
        .find(|p| p.is_file())
        .ok_or(())
}

#[test]
fn the_manual_page_holds_every_command() {
    let (code, page, err) = pinlow(&["man"]);
    assert_eq!(code, 0, "{err}");
    assert!(page.contains(".TH pinlow 1"), "{page}");
    for section in ["NAME", "SYNOPSIS", "OPTIONS", "COMMANDS", "VERSION"] {
        assert!(page.contains(&format!(".SH {section}")), "{section}");
    }
    // One title line: the preamble of the sections is written once.
    assert_eq!(page.matches(".TH ").count(), 1);
    assert_eq!(
        page.matches(".ds Aq").count(),
        2,
        "one preamble (.ie / .el)"
    );
    for path in command_paths() {
        let heading = format!(".SS \"pinlow {}\"", path.join(" "));
        assert!(page.contains(&heading), "{heading} missing");
        // Its full help follows, with its usage line (roff escapes the dashes).
        let usage = format!("Usage: pinlow {}", path.join(" "));
        assert!(page.contains(&usage), "{usage} missing");
    }
    // Flags of nested commands are there too, escaped for roff.
    assert!(page.contains("\\-\\-only\\-problems"));
}

#[test]
fn version_names_the_model_and_the_shipped_parts() {
    let (code, out, err) = pinlow(&["--version"]);
    assert_eq!(code, 0, "{err}");
    let lib = Library::builtin().expect("parts");
    assert_eq!(
        out,
        format!(
            "pinlow {} (stage model {MODEL_VERSION}, {} shipped parts)\n",
            env!("CARGO_PKG_VERSION"),
            lib.len()
        )
    );
    // The shipped parts are the files of parts/, one part a file.
    let files = std::fs::read_dir(concat!(env!("CARGO_MANIFEST_DIR"), "/parts"))
        .expect("parts/")
        .filter(|e| {
            e.as_ref()
                .is_ok_and(|e| e.path().extension().is_some_and(|x| x == "json"))
        })
        .count();
    assert!(out.contains(&format!(", {files} shipped parts)")), "{out}");
    assert_eq!(
        MODEL_VERSION, 2,
        "files.md: the report carries model_version 2"
    );
}
