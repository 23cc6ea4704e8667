//! Running ngspice in batch mode and reading its operating point.

use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::Command;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Environment variable that skips the ngspice tests (CI installs ngspice; a silent skip would
/// hide a broken install, so the default is to fail).
pub const SKIP_VAR: &str = "PINLOW_SKIP_NGSPICE";

/// True when the caller asked to skip.
pub fn skip_requested() -> bool {
    std::env::var(SKIP_VAR).map(|v| v == "1").unwrap_or(false)
}

/// Panic with a clear message unless ngspice runs.
pub fn require_ngspice() {
    match Command::new("ngspice").arg("--version").output() {
        Ok(_) => {}
        Err(e) => panic!(
            "ngspice could not be started ({e}). Install it (Debian/Ubuntu: `apt-get install -y ngspice`) \
             or set {SKIP_VAR}=1 to skip the ngspice cross-check"
        ),
    }
}

static COUNTER: AtomicUsize = AtomicUsize::new(0);

/// Write `netlist` to a temporary file, run `ngspice -b` on it and return every `name = value`
/// line it printed (names lower-cased). ngspice's batch mode may exit non-zero after a good run
/// (it complains that there is no .print line when the printing is done in .control), so the run
/// is judged by its output: every name in `expect` must have been printed.
pub fn run(netlist: &str, expect: &[&str]) -> BTreeMap<String, f64> {
    let n = COUNTER.fetch_add(1, Ordering::SeqCst);
    let path: PathBuf =
        std::env::temp_dir().join(format!("pinlow-ngspice-{}-{n}.cir", std::process::id()));
    std::fs::write(&path, netlist).expect("write netlist");
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&path)
        .output()
        .expect("ngspice runs (see require_ngspice)");
    let _ = std::fs::remove_file(&path);
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    let mut values = BTreeMap::new();
    for line in stdout.lines() {
        if let Some((name, value)) = line.split_once(" = ") {
            if let Ok(v) = value.trim().parse::<f64>() {
                values.insert(name.trim().to_lowercase(), v);
            }
        }
    }
    for name in expect {
        assert!(
            values.contains_key(*name),
            "ngspice printed no `{name}`\n--- netlist ---\n{netlist}\n--- stdout ---\n{stdout}\n--- stderr ---\n{stderr}"
        );
    }
    values
}
