package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.internal.merge.VectorClockPolicy;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Vector-clock dominance and siblings against published examples and against git's own ancestry answers. */
class VectorClockReferenceTest {
    static final RowSchema SCHEMA = RowSchema.builder("status")
            .field("id", FieldType.string())
            .field("clock", FieldType.map(FieldType.int64()))
            .field("status", FieldType.string())
            .build();

    static Map<String, Long> vc(long p1, long p2, long p3) {
        Map<String, Long> m = new TreeMap<>();
        m.put("p1", p1);
        m.put("p2", p2);
        m.put("p3", p3);
        m.values().removeIf(v -> v == 0);
        return m;
    }

    // --- Coulouris, Dollimore, Kindberg, Distributed Systems, Fig. 14.6 (5th ed.), values from memory

    @Test
    void dominates_textbookFigureVerdicts() {
        Map<String, Long> a = vc(1, 0, 0);
        Map<String, Long> c = vc(2, 1, 0);
        Map<String, Long> e = vc(0, 0, 1);
        Map<String, Long> f = vc(2, 2, 2);
        assertTrue(VectorClockPolicy.dominates(f, a), "a -> f");
        assertFalse(VectorClockPolicy.dominates(a, f));
        assertFalse(VectorClockPolicy.dominates(c, e), "c || e");
        assertFalse(VectorClockPolicy.dominates(e, c), "c || e");
        // Fidge/Mattern comparison (REFERENCES.md section 2): V < V' iff V <= V' pointwise and V != V'
        assertFalse(VectorClockPolicy.dominates(a, a), "a clock does not dominate itself");
    }

    @Test
    void dedupe_concurrentVersionsKeptAsSiblingsAndSupersededByTheirMerge() {
        DatasetSpec spec = DatasetSpec.builder().key("id").vectorClock("clock", DatasetSpec.Concurrent.KEEP_ALL).build();
        BatchEngine<Row> engine = BatchEngine.forRows(spec, SCHEMA);
        Row c = Row.of(SCHEMA, "x", vc(2, 1, 0), "c");
        Row e = Row.of(SCHEMA, "x", vc(0, 0, 1), "e");
        BatchResult<Row> r = engine.dedupe(List.of(c, e));
        assertEquals(2, r.survivors().size(), "concurrent c and e both kept");
        assertEquals(1, r.report().keysWithSiblings());
        // a receive at p3 takes the per-entry max of both clocks, then ticks its own entry (Fidge/Mattern rules)
        Row f = Row.of(SCHEMA, "x", vc(2, 1, 2), "f");
        BatchResult<Row> r2 = engine.dedupe(List.of(c, e, f));
        assertEquals(List.of(f), r2.survivors());
        assertEquals(2, r2.report().superseded());
    }

    // --- Preguica et al., Dotted Version Vectors, arXiv:1011.5808, the example as recorded from memory:
    // v1=(A,1), v2=(A,2) written without context; v3 written with a context covering only (A,1).
    @Test
    void dedupe_writeWithOlderContextReplacesOnlyWhatItCovers() {
        DatasetSpec spec = DatasetSpec.builder().key("id").vectorClock("clock", DatasetSpec.Concurrent.KEEP_ALL).build();
        Row v1 = Row.of(SCHEMA, "k", Map.of("A", 1L), "v1");
        Row v2 = Row.of(SCHEMA, "k", Map.of("A", 2L), "v2");
        Row v3 = Row.of(SCHEMA, "k", Map.of("A", 1L, "B", 1L), "v3");
        List<Row> out = BatchEngine.forRows(spec, SCHEMA).dedupe(List.of(v3, v1, v2)).survivors();
        assertEquals(2, out.size());
        assertEquals(List.of("v2", "v3"), out.stream().map(r -> (String) r.get("status")).sorted().toList());
    }

    // --- happens-before from a real history: git's commit graph (git merge-base --is-ancestor)

    @Test
    void dominates_agreesWithGitAncestry(@TempDir Path repo) throws Exception {
        Assumptions.assumeTrue(run(repo, "git", "--version").exit == 0, "git is not installed");
        git(repo, "init", "-q", "-b", "main");
        String[] writers = {"main", "left", "right"};
        Map<String, Map<String, Long>> clocks = new LinkedHashMap<>();
        Map<String, String> head = new HashMap<>();
        java.util.Random rnd = new java.util.Random(7);
        commit(repo, "main", clocks, head, List.of());
        git(repo, "branch", "left");
        git(repo, "branch", "right");
        head.put("left", head.get("main"));
        head.put("right", head.get("main"));
        for (int step = 0; step < 24; step++) {
            String w = writers[rnd.nextInt(3)];
            git(repo, "checkout", "-q", w);
            if (rnd.nextInt(3) == 0) {
                String other = writers[rnd.nextInt(3)];
                if (!other.equals(w) && !head.get(other).equals(head.get(w))) {
                    git(repo, "merge", "-q", "--no-ff", "--no-edit", "-m", "merge " + other + " into " + w, other);
                    commitClock(repo, w, clocks, head, List.of(head.get(w), head.get(other)));
                    continue;
                }
            }
            commit(repo, w, clocks, head, List.of(head.get(w)));
        }
        List<String> commits = new ArrayList<>(clocks.keySet());
        int checked = 0;
        for (String x : commits) {
            for (String y : commits) {
                if (x.equals(y)) {
                    continue;
                }
                boolean gitSaysBefore = run(repo, "git", "merge-base", "--is-ancestor", x, y).exit == 0;
                assertEquals(gitSaysBefore, VectorClockPolicy.dominates(clocks.get(y), clocks.get(x)),
                        "happens-before of " + x + " and " + y);
                checked++;
            }
        }
        assertTrue(checked > 300);
    }

    private static void commit(Path repo, String writer, Map<String, Map<String, Long>> clocks, Map<String, String> head,
            List<String> parents) throws Exception {
        Files.writeString(repo.resolve(writer + ".txt"), "edit " + clocks.size() + "\n", StandardCharsets.UTF_8);
        git(repo, "add", "-A");
        git(repo, "commit", "-q", "-m", "c" + clocks.size());
        commitClock(repo, writer, clocks, head, parents);
    }

    /** The commit's clock: per-entry max of its parents' clocks, then its writer's entry ticks (Fidge/Mattern). */
    private static void commitClock(Path repo, String writer, Map<String, Map<String, Long>> clocks, Map<String, String> head,
            List<String> parents) throws Exception {
        String sha = run(repo, "git", "rev-parse", "HEAD").out.trim();
        Map<String, Long> clock = new TreeMap<>();
        for (String p : parents) {
            if (p != null) {
                clocks.get(p).forEach((k, v) -> clock.merge(k, v, Math::max));
            }
        }
        clock.merge(writer, 1L, Long::sum);
        clocks.put(sha, clock);
        head.put(writer, sha);
    }

    private record Result(int exit, String out) {}

    private static void git(Path repo, String... args) throws Exception {
        String[] cmd = new String[args.length + 1];
        cmd[0] = "git";
        System.arraycopy(args, 0, cmd, 1, args.length);
        Result r = run(repo, cmd);
        if (r.exit != 0) {
            throw new IOException("git failed: " + String.join(" ", cmd) + "\n" + r.out);
        }
    }

    private static Result run(Path dir, String... cmd) throws Exception {
        ProcessBuilder pb = new ProcessBuilder(cmd).directory(dir.toFile()).redirectErrorStream(true);
        // a fresh machine may have no git identity configured
        pb.environment().putAll(Map.of("GIT_AUTHOR_NAME", "t", "GIT_AUTHOR_EMAIL", "t@example.invalid",
                "GIT_COMMITTER_NAME", "t", "GIT_COMMITTER_EMAIL", "t@example.invalid", "GIT_CONFIG_NOSYSTEM", "1"));
        Process p = pb.start();
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        if (!p.waitFor(30, TimeUnit.SECONDS)) {
            p.destroyForcibly();
            throw new IOException("timed out: " + String.join(" ", cmd));
        }
        return new Result(p.exitValue(), out);
    }
}
