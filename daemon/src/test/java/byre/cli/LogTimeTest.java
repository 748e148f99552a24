package byre.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Map;
import org.junit.jupiter.api.Test;

/** Log lines carry a time unless standard output is journald's own stream (which stamps every line). */
class LogTimeTest {
    @Test
    void aTerminalOrAFileGetsTheTime() {
        assertEquals(LogTime.PATTERN, LogTime.prefix(Map.of(), "0:136"));
        assertEquals(LogTime.PATTERN, LogTime.prefix(Map.of("JOURNAL_STREAM", ""), null));
    }

    @Test
    void journaldGetsNoneButAChildWritingElsewhereDoes() {
        // systemd.exec(5): JOURNAL_STREAM is "<device>:<inode>" of the stream connected to the journal
        assertEquals("", LogTime.prefix(Map.of("JOURNAL_STREAM", "8:41223"), "8:41223"));
        assertEquals(LogTime.PATTERN, LogTime.prefix(Map.of("JOURNAL_STREAM", "8:41223"), "2049:7731"), "inherited, but output goes to a file");
        assertEquals("", LogTime.prefix(Map.of("JOURNAL_STREAM", "8:41223"), null), "cannot tell: trust the variable");
    }

    @Test
    void theDeviceAndInodeOfStandardOutputCanBeRead() {
        String s = LogTime.stdoutDeviceInode();
        // on Linux (the only platform byre ships for) /proc/self/fd/1 always answers
        assertEquals(true, s != null && s.matches("\\d+:\\d+"), String.valueOf(s));
    }
}
