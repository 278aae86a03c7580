//! The `yieldshift` binary: a thin entry point over [`yieldshift::cli`].

fn main() -> std::process::ExitCode {
    yieldshift::cli::main()
}
