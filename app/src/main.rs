fn main() {
    tapline_app::start();
}
