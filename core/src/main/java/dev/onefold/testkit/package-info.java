/**
 * The test kit for teams' own sinks: generates seeded at-least-once delivery schedules (duplicates, bounded
 * reordering, batch splits, several source partitions, crashes with replays from an earlier offset), feeds them
 * to a {@link dev.onefold.testkit.Sink}, and checks that the sink ends in the state the batch engine computes,
 * reporting the smallest failing schedule found and the keys that differ.
 *
 * <p>Start with {@link dev.onefold.testkit.SinkCheck}. {@link dev.onefold.testkit.JdbcTableSink} wraps a JDBC
 * writer; {@code dev.onefold.testkit.jqwik} holds arbitraries for jqwik users. Nothing here needs a test
 * framework at run time.
 */
package dev.onefold.testkit;
