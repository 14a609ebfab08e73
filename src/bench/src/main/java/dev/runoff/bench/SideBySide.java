package dev.runoff.bench;

import java.io.File;
import java.lang.management.ManagementFactory;
import java.lang.management.ThreadMXBean;
import java.lang.reflect.Field;
import java.lang.reflect.InvocationTargetException;
import java.lang.reflect.Method;
import java.net.MalformedURLException;
import java.net.URL;
import java.net.URLClassLoader;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Compares one benchmark method under two class paths (for example the classes of an earlier commit and the
 * current ones) in one JVM: each class path gets its own class loader and bench instance, and passes of the
 * two alternate (A B, B A, A B, ...) after two warm-up rounds. Each pass is timed by the thread's CPU time as
 * well as the wall clock: on a machine shared with other builds the CPU time moves far less than the wall
 * time, so the per-round ratio of CPU times is the figure to quote.
 *
 * <p>Usage: {@code java -cp src/bench/target/classes dev.runoff.bench.SideBySide CLASS METHOD CALLS ROUNDS
 * CLASSPATH_A CLASSPATH_B [FIELD=VALUE ...]}; {@code CALLS} calls of {@code METHOD} make one pass
 * ({@code METHOD_A,METHOD_B} runs a different method on each side, say an earlier and a new estimator, with
 * the same class path twice); each class path must hold the bench class and everything it needs;
 * {@code FIELD=VALUE} sets a public {@code int} or {@code String} field (the JMH parameters) before
 * {@code setUp()} runs, on both sides, and {@code A:FIELD=VALUE} or {@code B:FIELD=VALUE} on one side only
 * (say, two engine versions of the same classes: {@code A:engineVersion=1.2 B:engineVersion=1.3}).
 */
public final class SideBySide {
    private static final int WARM_UP_ROUNDS = 2;

    private SideBySide() {
    }

    /**
     * Runs the comparison and prints every pass, the medians and the per-round CPU ratios A / B.
     *
     * @param args see the class comment
     * @throws ReflectiveOperationException when the class, method or a field cannot be used
     * @throws MalformedURLException        when a class path entry is not a valid path
     */
    public static void main(String[] args) throws ReflectiveOperationException, MalformedURLException {
        if (args.length < 6) {
            throw new IllegalArgumentException("usage: SideBySide CLASS METHOD CALLS ROUNDS CLASSPATH_A CLASSPATH_B"
                    + " [FIELD=VALUE ...]");
        }
        int calls = Integer.parseInt(args[2]);
        int rounds = Integer.parseInt(args[3]);
        List<String> settings = Arrays.asList(args).subList(6, args.length);
        String[] methods = args[1].split(",", 2);
        Pass[] passes = {Pass.of(args[0], methods[0], args[4], settings, "A"),
            Pass.of(args[0], methods[methods.length - 1], args[5], settings, "B")};
        double[][] cpu = new double[2][rounds];
        ThreadMXBean threads = ManagementFactory.getThreadMXBean();
        for (int round = -WARM_UP_ROUNDS; round < rounds; round++) {
            for (int turn = 0; turn < 2; turn++) {
                int k = (round & 1) == 0 ? turn : 1 - turn;
                long cpu0 = threads.getCurrentThreadCpuTime();
                long wall0 = System.nanoTime();
                passes[k].run(calls);
                double seconds = (threads.getCurrentThreadCpuTime() - cpu0) / 1e9;
                System.out.printf("round %d %s: cpu %.4f s, wall %.4f s%n", round, k == 0 ? "A" : "B", seconds,
                        (System.nanoTime() - wall0) / 1e9);
                if (round >= 0) {
                    cpu[k][round] = seconds;
                }
            }
        }
        double[] ratio = new double[rounds];
        for (int r = 0; r < rounds; r++) {
            ratio[r] = cpu[0][r] / cpu[1][r];
        }
        System.out.printf("median cpu per pass: A %.4f s, B %.4f s; A / B per round %s, median %.3f%n",
                median(cpu[0]), median(cpu[1]), Arrays.toString(ratio), median(ratio));
    }

    private static double median(double[] values) {
        double[] sorted = values.clone();
        Arrays.sort(sorted);
        int n = sorted.length;
        return n % 2 == 1 ? sorted[n / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
    }

    /** A bench instance loaded from one class path, set up and ready to call. */
    record Pass(Object bench, Method method) {

        /** The bench under {@code classPath} with the settings for both sides and for {@code side} ("A" or "B"). */
        static Pass of(String className, String methodName, String classPath, List<String> settings, String side)
                throws ReflectiveOperationException, MalformedURLException {
            List<URL> urls = new ArrayList<>();
            for (String entry : classPath.split(File.pathSeparator)) {
                urls.add(new File(entry).toURI().toURL());
            }
            ClassLoader loader = new URLClassLoader(urls.toArray(URL[]::new), ClassLoader.getPlatformClassLoader());
            Class<?> type = Class.forName(className, true, loader);
            Object bench = type.getConstructor().newInstance();
            for (String setting : settings) {
                boolean sided = setting.startsWith("A:") || setting.startsWith("B:");
                if (sided && !setting.startsWith(side + ":")) {
                    continue;
                }
                String[] pair = (sided ? setting.substring(2) : setting).split("=", 2);
                Field field = type.getField(pair[0]);
                field.set(bench, field.getType() == int.class ? Integer.valueOf(pair[1]) : pair[1]);
            }
            for (Method m : type.getMethods()) {
                if (m.getName().equals("setUp") && m.getParameterCount() == 0) {
                    m.invoke(bench);
                }
            }
            return new Pass(bench, type.getMethod(methodName));
        }

        void run(int calls) throws IllegalAccessException, InvocationTargetException {
            for (int i = 0; i < calls; i++) {
                method.invoke(bench);
            }
        }
    }
}
