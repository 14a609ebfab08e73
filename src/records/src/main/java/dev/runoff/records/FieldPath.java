package dev.runoff.records;

/**
 * Where a value sits in a record (a field of a parent, or an item of a list), for the messages that name
 * it: the dotted path of {@link Problems#path}, {@code [i]} for list items, e.g. {@code arms[2].posterior.a}.
 * Record walks build these as they descend and render one only when a value is wrong, so a walk of a valid
 * record joins no strings. The top level is {@code null}.
 *
 * @param parent the path of the enclosing record or list, {@code null} at the top level
 * @param field  the field's name, or {@code null} for a list item
 * @param item   the list index, or -1 for a field
 */
record FieldPath(FieldPath parent, String field, int item) {

    /** The path of field {@code name} of the record at {@code parent}. */
    static FieldPath field(FieldPath parent, String name) {
        return new FieldPath(parent, name, -1);
    }

    /** The path of item {@code index} of the list at {@code list}. */
    static FieldPath item(FieldPath list, int index) {
        return new FieldPath(list, null, index);
    }

    /** The text of {@code path}; the empty string for the top level. */
    static String text(FieldPath path) {
        if (path == null) {
            return "";
        }
        String parent = text(path.parent);
        return path.field != null ? Problems.path(parent, path.field) : parent + "[" + path.item + "]";
    }
}
