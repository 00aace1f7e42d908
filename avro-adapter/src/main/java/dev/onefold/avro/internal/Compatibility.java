package dev.onefold.avro.internal;

import java.util.ArrayList;
import java.util.List;
import org.apache.avro.SchemaCompatibility;

/** Renders the findings of Avro's own {@link SchemaCompatibility} checker as readable reasons. */
public final class Compatibility {
    private Compatibility() {}

    /** One reason per incompatibility, each with its location in the schema, joined by "; ". */
    public static String reasons(SchemaCompatibility.SchemaCompatibilityResult result) {
        return String.join("; ", reasonList(result));
    }

    public static List<String> reasonList(SchemaCompatibility.SchemaCompatibilityResult result) {
        List<String> out = new ArrayList<>();
        for (SchemaCompatibility.Incompatibility i : result.getIncompatibilities()) {
            out.add(i.getType().name().toLowerCase(java.util.Locale.ROOT).replace('_', ' ') + " at " + i.getLocation()
                    + (i.getMessage() == null || i.getMessage().isEmpty() ? "" : " (" + i.getMessage() + ")"));
        }
        return out;
    }
}
