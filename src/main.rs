//! The offgas command line: parse, call the library, print.
//!
//! Exit status: 0 clear, 3 review, 4 stop, 1 error in the input or the run, 2 usage error.

mod cli;

fn main() -> std::process::ExitCode {
    cli::run()
}
