//! The `oraculum` command: parses arguments and hands the work to the library.

mod cli;

fn main() {
    std::process::exit(cli::run());
}
