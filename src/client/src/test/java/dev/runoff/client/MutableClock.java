package dev.runoff.client;

/** A clock the test moves by hand. */
final class MutableClock extends MillisClock {
    private volatile long millis;

    MutableClock(long millis) {
        this.millis = millis;
    }

    void set(long newMillis) {
        this.millis = newMillis;
    }

    @Override
    public long millis() {
        return millis;
    }
}
