package dev.runoff.cli;

/** Entry point placeholder while the build is prepared. */
public final class Main {
    private Main() {
    }

    public static void main(String[] args) {
        System.out.println("runoff");
    }
}
