/** Implementation of the Avro adapter; not an API, may change without notice. */
package dev.onefold.avro.internal;
