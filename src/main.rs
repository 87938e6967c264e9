//! The `frostline` command: parse argv, run, map the outcome to an exit code (0 ok, 2 bad input
//! or usage, 1 runtime failure).
mod cli;

fn main() {
    std::process::exit(cli::main_exit_code());
}
