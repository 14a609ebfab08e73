package dev.runoff.topology;

/** Unit entries through the units store's serde, for the encoding tests. */
final class UnitEntryCodec {

    private UnitEntryCodec() {
    }

    /** The unit of the entry {@code bytes} encode. */
    static UnitState read(byte[] bytes) {
        return UnitEntry.SERDE.deserializer().deserialize("t", bytes).unit();
    }

    /** {@code unit} written in an entry without ids and read back. */
    static UnitState roundTrip(UnitState unit) {
        return read(UnitEntry.SERDE.serializer().serialize("t", UnitEntry.EMPTY.withUnit(unit)));
    }
}
