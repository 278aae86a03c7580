//! The `yieldshift` binary: the command line over the `yieldshift` library.
//! Exit codes are decided once, in [`cli::main`].

mod cli;

fn main() -> std::process::ExitCode {
    cli::main()
}
