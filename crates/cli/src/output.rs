//! Where machine output goes, and in which format.
//!
//! Every command that prints results takes `--format text|csv|json` (where it applies) and
//! `-o FILE`. Without `-o`, output goes to stdout. With `-o`, it is written atomically: to a
//! temporary file in the same folder, flushed and synced, then renamed over the target, so
//! an interrupted run leaves the old file or the new one, never half of one. A target that
//! is one of the command's input files (the result, its collection, any increment's data
//! file) is refused, and so is any existing file that looks like a VTK file: a text, CSV or
//! JSON output never replaces a result.

use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

use clap::ValueEnum;

use crate::failure::Failure;

/// Output format of a command.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum, Default)]
pub enum Format {
    /// A readable aligned table.
    #[default]
    Text,
    /// Comma-separated values with a header line.
    Csv,
    /// One JSON document.
    Json,
}

/// Every file a series reads that the catalogue knows: the result as given (file or folder),
/// the collection it was found through, and every increment's data files (all `.pvd` parts).
pub fn series_inputs(series: &ductrace_vtk::Series) -> Vec<PathBuf> {
    let mut v = vec![series.path().to_path_buf()];
    match series.discovery() {
        ductrace_vtk::Discovery::Pvd(p) | ductrace_vtk::Discovery::FolderPvd(p) => {
            v.push(p.clone());
        }
        _ => {}
    }
    for k in 0..series.increments().len() {
        v.extend(series.increment_files(k).iter().cloned());
    }
    v
}

/// True when the first bytes of an existing file look like a VTK file (XML `<VTKFile` or a
/// legacy `# vtk DataFile` header); false when it cannot be read.
fn looks_like_vtk(path: &Path) -> bool {
    use std::io::Read;
    let Ok(mut f) = fs::File::open(path) else {
        return false;
    };
    let mut head = [0u8; 512];
    let mut n = 0;
    while n < head.len() {
        match f.read(&mut head[n..]) {
            Ok(0) | Err(_) => break,
            Ok(k) => n += k,
        }
    }
    let head = &head[..n];
    head.windows(8).any(|w| w == b"<VTKFile") || head.starts_with(b"# vtk DataFile")
}

/// Refuses a target that exists and looks like a VTK file (a result, or a piece of one that
/// the catalogue does not list, such as the pieces of a `.pvtu`).
pub fn refuse_vtk(target: &Path) -> Result<(), Failure> {
    if target.is_file() && looks_like_vtk(target) {
        return Err(Failure::usage(format!(
            "{}: refusing to write over a VTK file (an input or a result); choose another output name",
            target.display()
        )));
    }
    Ok(())
}

/// Checks an output target before any work is done: not one of `inputs`, not an existing
/// VTK file. `None` (stdout) always passes.
pub fn check_target(target: Option<&Path>, inputs: &[&Path]) -> Result<(), Failure> {
    if let Some(path) = target {
        refuse_inputs(path, inputs)?;
        refuse_vtk(path)?;
    }
    Ok(())
}

/// Writes `bytes` to `target` (stdout when `None`), refusing to overwrite any of `inputs`.
pub fn emit(bytes: &[u8], target: Option<&Path>, inputs: &[&Path]) -> Result<(), Failure> {
    match target {
        None => {
            let stdout = std::io::stdout();
            let mut lock = stdout.lock();
            lock.write_all(bytes).map_err(Failure::stdout)?;
            lock.flush().map_err(Failure::stdout)
        }
        Some(path) => {
            check_target(Some(path), inputs)?;
            write_atomic(path, bytes)
        }
    }
}

/// Refuses a target that names an input file.
pub fn refuse_inputs(target: &Path, inputs: &[&Path]) -> Result<(), Failure> {
    let t = canonical_or_self(target);
    for input in inputs {
        if canonical_or_self(input) == t {
            return Err(Failure::usage(format!(
                "{}: refusing to write over an input file",
                target.display()
            )));
        }
    }
    Ok(())
}

fn canonical_or_self(p: &Path) -> PathBuf {
    fs::canonicalize(p).unwrap_or_else(|_| p.to_path_buf())
}

/// Writes a file atomically: a temporary file in the same folder, synced, then renamed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), Failure> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".to_string());
    let tmp = dir.join(format!(".{name}.ductrace-{}.tmp", std::process::id()));
    let result = (|| {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = fs::remove_file(&tmp);
        return Err(Failure::io(path, "write", e));
    }
    Ok(())
}

/// Formats a number for text and CSV output: shortest round-trip representation, or the
/// empty string for an undefined value.
pub fn num(v: Option<f64>) -> String {
    match v {
        Some(x) => format!("{x}"),
        None => String::new(),
    }
}

/// Formats a number for an aligned text table with `digits` significant digits, or `—`.
pub fn num_text(v: Option<f64>, digits: usize) -> String {
    match v {
        None => "—".to_string(),
        Some(0.0) => "0".to_string(),
        Some(x) => {
            // The exponent of the value as rounded to `digits` significant digits.
            let sci = format!("{x:.prec$e}", prec = digits.saturating_sub(1));
            let exponent: i32 = sci
                .rsplit_once('e')
                .and_then(|(_, e)| e.parse().ok())
                .unwrap_or(0);
            if (-4..7).contains(&exponent) {
                let decimals = (digits as i32 - 1 - exponent).max(0) as usize;
                format!("{x:.decimals$}")
            } else {
                sci
            }
        }
    }
}

/// Display width of a cell: characters, not counting combining marks (θ̄ is one column).
pub fn width(s: &str) -> usize {
    s.chars()
        .filter(|c| !('\u{0300}'..='\u{036F}').contains(c))
        .count()
}

/// Renders rows as an aligned text table: columns whose cells are all numbers (or empty,
/// or `—`) are right-aligned, the others left-aligned.
pub fn table(header: &[&str], rows: &[Vec<String>]) -> String {
    let n = header.len();
    let mut widths: Vec<usize> = header.iter().map(|h| width(h)).collect();
    let mut numeric = vec![true; n];
    for row in rows {
        for (i, cell) in row.iter().enumerate().take(n) {
            widths[i] = widths[i].max(width(cell));
            if !(cell.is_empty() || cell == "—" || cell.parse::<f64>().is_ok()) {
                numeric[i] = false;
            }
        }
    }
    let mut out = String::new();
    let line = |cells: &mut dyn Iterator<Item = &str>, out: &mut String| {
        for (i, cell) in cells.enumerate().take(n) {
            let pad = widths[i].saturating_sub(width(cell));
            if i > 0 {
                out.push_str("  ");
            }
            if numeric[i] {
                out.push_str(&" ".repeat(pad));
                out.push_str(cell);
            } else {
                out.push_str(cell);
                out.push_str(&" ".repeat(pad));
            }
        }
        while out.ends_with(' ') {
            out.pop();
        }
        out.push('\n');
    };
    line(&mut header.iter().copied(), &mut out);
    for row in rows {
        line(&mut row.iter().map(String::as_str), &mut out);
    }
    out
}

/// Quotes a CSV field when it needs it (RFC 4180).
pub fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_whole_file() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("out.csv");
        write_atomic(&p, b"old").unwrap();
        write_atomic(&p, b"new contents").unwrap();
        assert_eq!(fs::read(&p).unwrap(), b"new contents");
        let leftovers: Vec<_> = fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(leftovers.len(), 1);
    }

    #[test]
    fn refuses_to_overwrite_inputs() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("in.vtu");
        fs::write(&p, b"x").unwrap();
        assert!(refuse_inputs(&p, &[&p]).is_err());
        assert!(refuse_inputs(&dir.path().join("other"), &[&p]).is_ok());
    }

    #[test]
    fn numbers_and_tables() {
        assert_eq!(num(None), "");
        assert_eq!(num(Some(0.25)), "0.25");
        assert_eq!(num_text(Some(1.0 / 3.0), 6), "0.333333");
        assert_eq!(num_text(Some(123.456789), 6), "123.457");
        assert_eq!(num_text(None, 6), "—");
        let t = table(&["a", "bb"], &[vec!["x".into(), "1".into()]]);
        assert_eq!(t, "a  bb\nx   1\n");
        let t = table(&["name", "v"], &[vec!["long".into(), "x".into()]]);
        assert_eq!(t, "name  v\nlong  x\n");
        assert_eq!(csv_field("a,b"), "\"a,b\"");
    }
}
