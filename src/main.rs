fn main() {
    std::process::exit(starsift::cli::main());
}
