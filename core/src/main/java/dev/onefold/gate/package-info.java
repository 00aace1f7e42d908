/**
 * The streaming gate for consumer services: {@link dev.onefold.gate.StreamGate} decides per record read from a
 * partitioned log whether to emit, drop or hold it, following the dataset's merge policy, and tracks which
 * source offsets are safe to commit. {@link dev.onefold.gate.StoredStateLookup} connects exact mode to the store
 * the sink writes to.
 */
package dev.onefold.gate;
