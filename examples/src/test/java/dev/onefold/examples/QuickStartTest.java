package dev.onefold.examples;

import org.junit.jupiter.api.Test;

/** Examples check their own results; this runs the quick start in the build. */
class QuickStartTest {
    @Test
    void main_producesTheDocumentedResult() {
        QuickStart.main(new String[0]);
    }
}
