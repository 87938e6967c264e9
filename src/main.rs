//! Thin binary: parse argv, run, map the outcome to an exit code (0 ok, 2 bad input, 1 failure).
fn main() {
    std::process::exit(frostline::cli::main_exit_code());
}
