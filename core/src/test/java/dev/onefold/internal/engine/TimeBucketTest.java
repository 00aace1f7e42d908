package dev.onefold.internal.engine;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.DatasetSpec.TimeUnit;
import dev.onefold.record.FieldType.Kind;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * UTC bucketing of epoch milliseconds. Instants: notable Unix timestamps (REFERENCES.md section 7, e.g.
 * 946684800 = 2000-01-01T00:00:00Z, 2147483647 = 2038-01-19T03:14:07Z); leap-year rule of POSIX/Gregorian
 * calendars (2000 and 2024 leap, 2023 and 2100 not); day boundaries computed with java.time as listed there.
 */
class TimeBucketTest {

    @ParameterizedTest
    @CsvSource({
            "0,               HOUR,  1970-01-01T00",
            "946684800000,    DAY,   2000-01-01",
            "946684799999,    DAY,   1999-12-31",
            "1000000000000,   HOUR,  2001-09-09T01",
            "1700000000000,   HOUR,  2023-11-14T22",
            "2147483647000,   HOUR,  2038-01-19T03",
            "1709164800000,   DAY,   2024-02-29",
            "1709251199999,   DAY,   2024-02-29",
            "1709251200000,   DAY,   2024-03-01",
            "1709251199999,   MONTH, 2024-02",
            "1735686000000,   HOUR,  2024-12-31T23",
            "1735689600000,   MONTH, 2025-01",
            "-1,              HOUR,  1969-12-31T23",
            "4107542400000,   DAY,   2100-03-01",
    })
    void timeBucket_utcBoundaries(long millis, TimeUnit unit, String expected) {
        assertEquals(expected, BoundDataset.timeBucket(Kind.TIMESTAMP_MILLIS, millis, unit));
    }

    @ParameterizedTest
    @CsvSource({
            "1709164800000000, TIMESTAMP_MICROS, 2024-02-29",
            "-1,               TIMESTAMP_MICROS, 1969-12-31",
            "19782,            DATE,             2024-02-29",
            "0,                DATE,             1970-01-01",
    })
    void timeBucket_otherTimeKinds(long value, Kind kind, String expected) {
        assertEquals(expected, BoundDataset.timeBucket(kind, value, TimeUnit.DAY));
    }
}
