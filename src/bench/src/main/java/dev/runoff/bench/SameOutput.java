package dev.runoff.bench;

import java.net.MalformedURLException;
import java.util.Arrays;
import java.util.List;

/**
 * Checks that one bench method returns the same value under two class paths (for example an earlier commit's
 * classes and the current ones), each in its own class loader: with a method that digests every output of a
 * bench ({@link RecomputeBench#digestAll}), equal values show that a change made for speed kept the output
 * bits.
 *
 * <p>Usage: {@code java -cp src/bench/target/classes dev.runoff.bench.SameOutput CLASS METHOD CLASSPATH_A
 * CLASSPATH_B [FIELD=VALUE ...]}, the settings as for {@link SideBySide}. Prints both values and exits with
 * status 1 when they differ.
 */
public final class SameOutput {
    private SameOutput() {
    }

    /**
     * Runs the method under both class paths and compares the results' text.
     *
     * @param args see the class comment
     * @throws ReflectiveOperationException when the class, method or a field cannot be used
     * @throws MalformedURLException        when a class path entry is not a valid path
     */
    public static void main(String[] args) throws ReflectiveOperationException, MalformedURLException {
        if (args.length < 4) {
            throw new IllegalArgumentException("usage: SameOutput CLASS METHOD CLASSPATH_A CLASSPATH_B"
                    + " [FIELD=VALUE ...]");
        }
        List<String> settings = Arrays.asList(args).subList(4, args.length);
        String a = String.valueOf(run(args[0], args[1], args[2], settings, "A"));
        String b = String.valueOf(run(args[0], args[1], args[3], settings, "B"));
        System.out.println("A: " + a);
        System.out.println("B: " + b);
        System.out.println(a.equals(b) ? "same output" : "OUTPUT DIFFERS");
        if (!a.equals(b)) {
            System.exit(1);
        }
    }

    private static Object run(String className, String methodName, String classPath, List<String> settings,
                              String side) throws ReflectiveOperationException, MalformedURLException {
        SideBySide.Pass pass = SideBySide.Pass.of(className, methodName, classPath, settings, side);
        return pass.method().invoke(pass.bench());
    }
}
