//! The `gelu` binary: parse the command line, run, map errors to exit codes.

fn main() -> std::process::ExitCode {
    gelu::cli::run()
}
