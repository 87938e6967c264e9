//! Command-line interface.
/// Run the CLI and return the process exit code.
pub fn main_exit_code() -> i32 {
    0
}
