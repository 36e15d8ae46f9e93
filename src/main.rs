//! The `couplet` command: parses arguments, calls the library, renders, maps errors to exit codes.

mod cli;

fn main() -> std::process::ExitCode {
    cli::run()
}
