//! The `ribbonmap` command: a thin shell over [`ribbonmap::cli::main`].

fn main() -> std::process::ExitCode {
    ribbonmap::cli::main()
}
