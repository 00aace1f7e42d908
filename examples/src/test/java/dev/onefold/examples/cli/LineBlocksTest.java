package dev.onefold.examples.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import java.io.BufferedReader;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;

/**
 * Lines cut from blocks of bytes are the lines {@code BufferedReader.readLine} reads (the reader the tool used
 * before), with the same numbers, blank lines skipped, whatever the block size and the line ends (LF, CR, CR LF).
 */
class LineBlocksTest {
    private static final String[] PIECES = {"{\"id\":1}", "", " ", "\t", "\u000b", "\u001f", "\u2003", "\u00a0", "\u00e9",
        "\ud83d\ude00", "x", "\"\\n\"", "\ufffd"};
    private static final String[] ENDS = {"\n", "\r", "\r\n", "\n\n", "\r\r"};

    @Property(tries = 300)
    void lines_areThoseReadLineReads(@ForAll long seed, @ForAll @IntRange(min = 1, max = 64) int blockSize) throws IOException {
        Random random = new Random(seed);
        StringBuilder text = new StringBuilder();
        int lines = random.nextInt(40);
        for (int i = 0; i < lines; i++) {
            int pieces = random.nextInt(4);
            for (int p = 0; p < pieces; p++) {
                text.append(PIECES[random.nextInt(PIECES.length)]);
            }
            if (i < lines - 1 || random.nextBoolean()) {
                text.append(ENDS[random.nextInt(ENDS.length)]);
            }
        }
        Path file = Files.createTempFile("onefold-lines-", ".jsonl");
        try {
            Files.writeString(file, text, StandardCharsets.UTF_8);
            assertEquals(readLine(file), blocks(file, blockSize));
        } finally {
            Files.delete(file);
        }
    }

    /** "number: text" of every non-blank line, read the old way. */
    private static List<String> readLine(Path file) throws IOException {
        List<String> out = new ArrayList<>();
        try (BufferedReader r = Files.newBufferedReader(file, StandardCharsets.UTF_8)) {
            String line;
            long number = 0;
            long index = 0;
            while ((line = r.readLine()) != null) {
                number++;
                if (!line.isBlank()) {
                    out.add(number + "/" + index++ + ": " + line);
                }
            }
        }
        return out;
    }

    private static List<String> blocks(Path file, int blockSize) {
        List<String> out = new ArrayList<>();
        try (LineBlocks blocks = LineBlocks.open(file, blockSize)) {
            LineBlocks.Block b;
            while ((b = blocks.next()) != null) {
                for (int i = 0; i < b.count(); i++) {
                    out.add(b.numbers()[i] + "/" + (b.firstIndex() + i) + ": " + b.text(i));
                }
            }
        }
        return out;
    }

    @Property(tries = 50)
    void text_invalidUtf8_namesTheFileAndLine(@ForAll @IntRange(min = 1, max = 16) int blockSize) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        bytes.writeBytes("{\"a\":1}\r\n\n{\"a\":2}\n".getBytes(StandardCharsets.UTF_8));
        // 0xC3 0x28 is not UTF-8: 0xC3 opens a two-byte sequence that 0x28 cannot continue (RFC 3629 section 3)
        bytes.writeBytes(new byte[] {'{', '"', (byte) 0xC3, 0x28, '"', '}', '\n'});
        Path file = Files.write(Files.createTempFile("onefold-lines-", ".jsonl"), bytes.toByteArray());
        try (LineBlocks blocks = LineBlocks.open(file, blockSize)) {
            OnefoldException e = assertThrows(OnefoldException.class, () -> {
                LineBlocks.Block b;
                while ((b = blocks.next()) != null) {
                    for (int i = 0; i < b.count(); i++) {
                        b.text(i);
                    }
                }
            });
            assertEquals(OnefoldException.Kind.IO, e.kind());
            assertTrue(e.getMessage().startsWith(file + " line 4: not valid UTF-8"), e.getMessage());
        } finally {
            Files.delete(file);
        }
    }
}
