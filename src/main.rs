//! The `ductrace` binary: everything lives in the `ductrace-cli` crate (crates/cli).

fn main() -> std::process::ExitCode {
    ductrace_cli::main()
}
