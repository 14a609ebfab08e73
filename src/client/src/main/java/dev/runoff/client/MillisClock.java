package dev.runoff.client;

import java.time.Clock;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;

/** A UTC clock defined by its {@link #millis()} alone; the zone cannot be changed. */
abstract class MillisClock extends Clock {

    @Override
    public Instant instant() {
        return Instant.ofEpochMilli(millis());
    }

    @Override
    public ZoneId getZone() {
        return ZoneOffset.UTC;
    }

    /** Not supported: the clock is UTC only. */
    @Override
    public Clock withZone(ZoneId zone) {
        throw new UnsupportedOperationException(getClass().getSimpleName() + " is UTC only, asked for " + zone);
    }
}
