package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;

/** Checks object names handed to a storage: relative, slash-separated, no empty, dot or dot-dot steps. */
final class StorageNames {
    private StorageNames() {}

    static String check(String name) {
        if (name == null || name.isEmpty() || name.startsWith("/") || name.endsWith("/") || name.indexOf('\\') >= 0
                || name.indexOf('\0') >= 0) {
            throw OnefoldException.usage("storage name '" + name + "' must be a relative path without backslashes");
        }
        for (String step : name.split("/", -1)) {
            if (step.isEmpty() || step.equals(".") || step.equals("..")) {
                throw OnefoldException.usage("storage name '" + name + "' has an empty, '.' or '..' step");
            }
        }
        return name;
    }
}
