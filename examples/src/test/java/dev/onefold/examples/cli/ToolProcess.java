package dev.onefold.examples.cli;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

/**
 * Runs {@code java -jar examples/target/onefold.jar ...} as a separate process, the way a user or a script does,
 * and captures its exit status, stdout and stderr. The jar is built in the {@code package} phase; these tests run
 * in {@code integration-test} (failsafe), which passes its path as the system property {@code onefold.jar}.
 */
final class ToolProcess {
    /** What one run printed and returned. */
    record Result(int status, String out, String err) {
        List<String> errLines() {
            return err.lines().toList();
        }
    }

    private ToolProcess() {}

    static Path jar() {
        Path jar = Path.of(System.getProperty("onefold.jar", "target/onefold.jar"));
        if (!Files.isRegularFile(jar)) {
            throw new IllegalStateException(jar + " does not exist; run 'mvn verify' (the jar is built in the package phase)");
        }
        return jar;
    }

    static Result run(Path workDir, String... args) {
        List<String> command = new ArrayList<>();
        command.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
        // startup flags only (JIT tier and collector), so the short runs of the suite cost less CPU; behaviour is the same
        command.add("-XX:TieredStopAtLevel=1");
        command.add("-XX:+UseSerialGC");
        command.add("-jar");
        command.add(jar().toAbsolutePath().toString());
        command.addAll(List.of(args));
        try {
            Path out = Files.createTempFile(workDir, "stdout", ".txt");
            Path err = Files.createTempFile(workDir, "stderr", ".txt");
            Process p = new ProcessBuilder(command).directory(workDir.toFile()).redirectOutput(out.toFile())
                    .redirectError(err.toFile()).redirectInput(ProcessBuilder.Redirect.from(Path.of("/dev/null").toFile()))
                    .start();
            if (!p.waitFor(180, TimeUnit.SECONDS)) {
                p.destroyForcibly();
                throw new AssertionError("onefold " + String.join(" ", args) + " did not finish within 180 s");
            }
            Result r = new Result(p.exitValue(), Files.readString(out, StandardCharsets.UTF_8),
                    Files.readString(err, StandardCharsets.UTF_8));
            Files.delete(out);
            Files.delete(err);
            return r;
        } catch (IOException e) {
            throw new AssertionError("cannot run the tool: " + e, e);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new AssertionError("interrupted", e);
        }
    }
}
