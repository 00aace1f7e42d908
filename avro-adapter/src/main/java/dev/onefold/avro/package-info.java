/**
 * onefold for Avro generic records. {@link dev.onefold.avro.AvroDataset} is the front door: a record schema
 * and its spec (embedded in the schema or separate), from which come the
 * {@link dev.onefold.avro.AvroRecordAccess record access}, the {@link dev.onefold.avro.AvroPayloadCodec payload
 * codec} (single-object encoding, schema fingerprints, schema resolution through a
 * {@link dev.onefold.avro.SchemaStore}) and batch engines. {@link dev.onefold.avro.SchemaVersions} is the
 * compatibility gate for new schema versions; {@link dev.onefold.avro.ContainerFiles} and
 * {@link dev.onefold.avro.JsonLines} move records in and out of files.
 *
 * <p>Core never depends on this package; everything under {@code dev.onefold.avro.internal} is implementation.
 */
package dev.onefold.avro;
