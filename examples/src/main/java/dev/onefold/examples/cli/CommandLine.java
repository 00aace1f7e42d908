package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The options of one command, parsed from {@code --name value} (or {@code --name=value}) pairs. Options that
 * take several values ({@code --in a.jsonl b.avro}) collect every value up to the next option and may also be
 * repeated; the others may be given once. Anything else (an unknown option, a missing value, a stray
 * argument) is a USAGE error naming the command and the argument, which the tool reports with exit status 2.
 *
 * <p>Immutable after parsing; not shared between threads. Parsing is linear in the number of arguments.
 */
final class CommandLine {
    private final String command;
    private final Map<String, List<String>> values;

    private CommandLine(String command, Map<String, List<String>> values) {
        this.command = command;
        this.values = values;
    }

    /**
     * Parses the arguments of {@code command}.
     *
     * @param single options taking exactly one value, without the leading dashes
     * @param multi  options taking one or more values
     */
    static CommandLine parse(String command, List<String> args, Set<String> single, Set<String> multi) {
        Map<String, List<String>> values = new LinkedHashMap<>();
        String current = null;
        for (String arg : args) {
            if (arg.startsWith("--")) {
                String name = arg.substring(2);
                String inline = null;
                int eq = name.indexOf('=');
                if (eq >= 0) {
                    inline = name.substring(eq + 1);
                    name = name.substring(0, eq);
                }
                if (!single.contains(name) && !multi.contains(name)) {
                    throw usage(command, "unknown option --" + name);
                }
                if (single.contains(name) && values.containsKey(name)) {
                    throw usage(command, "option --" + name + " is given twice");
                }
                if (current != null && values.get(current).isEmpty()) {
                    throw usage(command, "option --" + current + " needs a value");
                }
                values.computeIfAbsent(name, n -> new ArrayList<>());
                current = name;
                if (inline != null) {
                    values.get(name).add(inline);
                    current = multi.contains(name) ? name : null;
                }
            } else if (current == null) {
                throw usage(command, "unexpected argument '" + arg + "'");
            } else {
                values.get(current).add(arg);
                if (single.contains(current)) {
                    current = null;
                }
            }
        }
        if (current != null && values.get(current).isEmpty()) {
            throw usage(command, "option --" + current + " needs a value");
        }
        return new CommandLine(command, values);
    }

    static OnefoldException usage(String command, String reason) {
        return OnefoldException.usage(command + ": " + reason + " (see 'onefold " + command + " --help')");
    }

    boolean has(String name) {
        return values.containsKey(name);
    }

    /** The value of a single-valued option, or null when it is absent. */
    String optional(String name) {
        List<String> v = values.get(name);
        return v == null ? null : v.get(0);
    }

    String required(String name) {
        String v = optional(name);
        if (v == null) {
            throw usage(command, "missing --" + name);
        }
        return v;
    }

    Path optionalPath(String name) {
        String v = optional(name);
        return v == null ? null : Path.of(v);
    }

    Path requiredPath(String name) {
        return Path.of(required(name));
    }

    /** Every value of a multi-valued option, in order; at least one. */
    List<Path> requiredPaths(String name) {
        List<String> v = values.get(name);
        if (v == null) {
            throw usage(command, "missing --" + name);
        }
        return v.stream().map(Path::of).toList();
    }

    /** A non-negative whole number option, or {@code absent} when not given. */
    long number(String name, long absent) {
        String v = optional(name);
        if (v == null) {
            return absent;
        }
        try {
            long n = Long.parseLong(v);
            if (n >= 0) {
                return n;
            }
        } catch (NumberFormatException e) {
            // reported below with the option's name
        }
        throw usage(command, "--" + name + " must be a whole number >= 0, got '" + v + "'");
    }

    String command() {
        return command;
    }
}
