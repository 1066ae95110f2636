//! The `hone` command: run, map the outcome to an exit code (0 ok, 1 finished with warnings,
//! 2 error) and print the error chain once.

fn main() -> std::process::ExitCode {
    hone::cli::main_exit_code()
}
