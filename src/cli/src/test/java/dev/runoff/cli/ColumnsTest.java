package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

class ColumnsTest {

    @Test
    void firstColumnIsLeftAlignedAndTheOthersRightAligned() {
        String nl = System.lineSeparator();
        String out = new Columns().row("arm", "rate", "").row("arm10", "0.5", "x").render();
        assertEquals("arm    rate" + nl + "arm10   0.5  x" + nl, out);
        assertEquals("", new Columns().render());
        assertThrows(IllegalArgumentException.class, () -> new Columns().row("a", "b").row("c"));
    }
}
