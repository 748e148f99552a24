package byre.rules;

import java.nio.ByteBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;

/**
 * One rule file's name (as shown in diagnostics) and text. The module does no I/O: the caller reads the
 * file. {@link #ofBytes} turns bytes that are not UTF-8 into U+FFFD, which the lexer then reports.
 */
public record RuleSource(String name, String text) {
    public RuleSource {
        name = name == null ? "<rules>" : name;
        text = text == null ? "" : text;
    }

    public static RuleSource ofBytes(String name, byte[] bytes) {
        try {
            return new RuleSource(name, StandardCharsets.UTF_8.newDecoder()
                    .onMalformedInput(CodingErrorAction.REPORT)
                    .onUnmappableCharacter(CodingErrorAction.REPORT)
                    .decode(ByteBuffer.wrap(bytes)).toString());
        } catch (CharacterCodingException e) {
            return new RuleSource(name, new String(bytes, StandardCharsets.UTF_8));
        }
    }
}
