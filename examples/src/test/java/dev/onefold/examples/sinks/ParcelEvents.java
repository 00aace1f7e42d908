package dev.onefold.examples.sinks;

import dev.onefold.record.Row;
import dev.onefold.testkit.JdbcTableSink;
import dev.onefold.testkit.SinkCheck;
import dev.onefold.testkit.SinkFactory;
import java.sql.DriverManager;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.concurrent.atomic.AtomicInteger;

/** Generated parcel status events and sink factories on fresh in-memory H2 databases, for the example tests. */
final class ParcelEvents {
    private static final String[] STATUSES = {"label-created", "in-transit", "at-depot", "out-for-delivery", "delivered"};
    private static final AtomicInteger DATABASES = new AtomicInteger();

    private ParcelEvents() {}

    /** 1 to 30 events over 6 parcels; versions are distinct, so each version of a parcel has one content. */
    static List<Row> generate(Random random) {
        int n = 1 + random.nextInt(30);
        List<Row> events = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            events.add(Row.of(ParcelTable.SCHEMA, "PCL-" + (1000 + random.nextInt(6)), (long) i,
                    STATUSES[random.nextInt(STATUSES.length)], random.nextBoolean() ? (long) random.nextInt(20_000) : null,
                    random.nextInt(12) == 0 ? Boolean.TRUE : null));
        }
        return events;
    }

    /** A check whose every run gets a new, empty in-memory database with the parcel table and this writer. */
    static SinkCheck<Row> check(JdbcTableSink.Writer writer, boolean uniqueKey) {
        SinkFactory<Row> sinks = () -> {
            // No DB_CLOSE_DELAY: the database lives while a connection is open and vanishes when the sink closes.
            String url = "jdbc:h2:mem:parcels" + DATABASES.incrementAndGet();
            return ParcelTable.open(() -> DriverManager.getConnection(url), writer, uniqueKey);
        };
        return SinkCheck.forRows(ParcelTable.SPEC, ParcelTable.SCHEMA, sinks);
    }
}
