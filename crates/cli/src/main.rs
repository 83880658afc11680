//! The `comptrail` binary: everything it does is in the `cli` library, so its tests can reach
//! the same code.

fn main() -> std::process::ExitCode {
    cli::main()
}
