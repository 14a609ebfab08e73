package dev.runoff.records;

import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.IndexedRecord;

/**
 * Which branch of a union a value takes, for the walks over records (canonical JSON, the generic checks),
 * mostly without Avro's lookup by type name. These schemas register no logical-type conversions, so a value's branch is decided by its type:
 * <ul>
 *   <li>An optional value, {@code [null, X]}: a non-null value of such a field of a generated class is an X
 *       (the class types the field, and its setters cast to that type), so it takes the other branch.</li>
 *   <li>A record takes the branch of the same full name, as in {@link GenericData#resolveUnion} (which looks
 *       the record's schema name up among the branches' names).</li>
 *   <li>Anything else is resolved by the data model.</li>
 * </ul>
 */
final class Unions {

    private Unions() {
    }

    /** The branch of {@code union} that the non-null {@code value} takes. */
    static Schema branch(Schema union, Object value, GenericData data) {
        List<Schema> types = union.getTypes();
        if (types.size() == 2) {
            if (types.get(0).getType() == Schema.Type.NULL) {
                return types.get(1);
            }
            if (types.get(1).getType() == Schema.Type.NULL) {
                return types.get(0);
            }
        }
        if (value instanceof IndexedRecord record) {
            String name = record.getSchema().getFullName();
            for (Schema type : types) {
                if (type.getType() == Schema.Type.RECORD && type.getFullName().equals(name)) {
                    return type;
                }
            }
        }
        return types.get(data.resolveUnion(union, value));
    }
}
