package dev.onefold.testkit;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.List;
import java.util.function.Function;

/**
 * The failure report of a sink that did not converge: the schedule that was generated, the smallest failing
 * sequence of steps found from it, the keys whose state differs with the expected and actual records, and the
 * exception if the sink threw. {@link #report()} renders it for a person; the accessors serve assertions.
 *
 * <p>Immutable when the records are; thread-safe. Rendering costs one line per step and per differing key,
 * capped at {@value #MAX_LINES} lines each.
 */
public final class Divergence<R> {
    static final int MAX_LINES = 40;

    private final Schedule<R> schedule;
    private final List<Step<R>> smallestSteps;
    private final int shrinkRuns;
    private final String context;
    private final Throwable error;
    private final List<KeyDifference<R>> differences;
    private final int expectedKeys;
    private final Function<R, String> render;

    Divergence(Schedule<R> schedule, List<Step<R>> smallestSteps, int shrinkRuns, String context, Throwable error,
            List<KeyDifference<R>> differences, int expectedKeys, Function<R, String> render) {
        this.schedule = schedule;
        this.smallestSteps = List.copyOf(smallestSteps);
        this.shrinkRuns = shrinkRuns;
        this.context = context;
        this.error = error;
        this.differences = List.copyOf(differences);
        this.expectedKeys = expectedKeys;
        this.render = render;
    }

    /** The schedule as generated (seed, settings, counts, all steps). */
    public Schedule<R> schedule() { return schedule; }

    /** The smallest sequence of steps found that still makes the sink fail; the whole schedule when not shrunk. */
    public List<Step<R>> smallestSteps() { return smallestSteps; }

    /** How many extra sink runs shrinking took (0 when not shrunk). */
    public int shrinkRuns() { return shrinkRuns; }

    /** The exception the sink threw on the smallest steps, or null when it ran but its state differs. */
    public Throwable error() { return error; }

    /** The keys whose state differs after the smallest steps, in key order; empty when the sink threw. */
    public List<KeyDifference<R>> differences() { return differences; }

    /** Whether the smallest failing steps contain a restart. */
    public boolean involvesRestart() {
        return smallestSteps.stream().anyMatch(s -> s instanceof Step.Restart);
    }

    /** The report for a person: what was run, what differs, how to reproduce. */
    public String report() {
        StringBuilder sb = new StringBuilder("sink did not converge to the state onefold computes\n");
        sb.append("  schedule: ").append(schedule.summary());
        if (!context.isEmpty()) {
            sb.append(" (").append(context).append(')');
        }
        sb.append('\n');
        sb.append("  smallest failing schedule found: ").append(smallestSteps.size())
                .append(smallestSteps.size() == 1 ? " step" : " steps");
        if (shrinkRuns > 0) {
            sb.append(", shrunk from ").append(schedule.steps().size()).append(" in ").append(shrinkRuns).append(" runs");
        }
        sb.append('\n');
        int line = 0;
        for (Step<R> step : smallestSteps) {
            if (++line > MAX_LINES) {
                sb.append("    ... ").append(smallestSteps.size() - MAX_LINES).append(" more steps\n");
                break;
            }
            sb.append("    ").append(line).append(". ").append(describe(step)).append('\n');
        }
        if (error != null) {
            StringWriter trace = new StringWriter();
            error.printStackTrace(new PrintWriter(trace));
            sb.append("  sink threw: ").append(trace.toString().lines().limit(8).reduce((a, b) -> a + "\n    " + b)
                    .orElse(String.valueOf(error))).append('\n');
        } else {
            sb.append("  keys whose state differs: ").append(differences.size()).append(" (of ").append(expectedKeys)
                    .append(" keys expected)\n");
            line = 0;
            for (KeyDifference<R> d : differences) {
                if (++line > MAX_LINES) {
                    sb.append("    ... ").append(differences.size() - MAX_LINES).append(" more keys\n");
                    break;
                }
                sb.append("    key ").append(d.key()).append('\n');
                sb.append("      expected ").append(records(d.expected())).append('\n');
                sb.append("      actual   ").append(records(d.actual())).append('\n');
            }
        }
        return sb.toString();
    }

    private String describe(Step<R> step) {
        if (step instanceof Step.Delivery<R> d) {
            StringBuilder sb = new StringBuilder("deliver");
            for (LogEntry<R> e : d.entries()) {
                sb.append(sb.length() > "deliver".length() ? ", " : " ").append(e).append(' ').append(render.apply(e.record()));
            }
            return sb.toString();
        }
        return step.toString();
    }

    private String records(List<R> rs) {
        return rs.isEmpty() ? "(none)" : rs.stream().map(render).toList().toString();
    }

    @Override
    public String toString() {
        return report();
    }
}
