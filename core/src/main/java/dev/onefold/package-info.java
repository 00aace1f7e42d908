/**
 * onefold: deduplicate, merge and order records so that every store fed from an at-least-once log holds
 * exactly one correct, ordered copy of each record.
 *
 * <p>The front door is {@link dev.onefold.DatasetSpec} (what a dataset's unique key, merge policy, order and
 * partitioning are) and {@link dev.onefold.BatchEngine} (deduplicate and order one batch). Everything in
 * packages named {@code internal} is implementation and may change without notice.
 */
package dev.onefold;
