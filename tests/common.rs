//! Shared helpers of the CLI tests: the binary with colour off and no user part folders.
#![allow(dead_code)]

use assert_cmd::Command;

/// `pinlow` run from the crate root, colour off, PINLOW_PARTS unset.
pub fn pinlow() -> Command {
    let mut cmd = Command::cargo_bin("pinlow").expect("binary is built");
    cmd.current_dir(env!("CARGO_MANIFEST_DIR"))
        .env_remove("PINLOW_PARTS")
        .env("NO_COLOR", "1");
    cmd
}

/// Run and return (exit code, stdout, stderr).
pub fn run(args: &[&str]) -> (i32, String, String) {
    let out = pinlow().args(args).output().expect("runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}
