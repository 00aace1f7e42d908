package dev.onefold.internal.hash;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * XXH64 against the reference implementation's own sanity table: Cyan4973/xxHash cli/xsum_sanity_check.c
 * (values as listed in ../shared/REFERENCES.md section 5). The test buffer is generated exactly as there.
 */
class XxHash64Test {
    private static final long PRIME32 = 2654435761L;
    private static final long PRIME64 = 0x9E3779B185EBCA8DL; // 11400714785074694797 as in the sanity-check source

    static byte[] sanityBuffer(int len) {
        byte[] buf = new byte[len];
        long gen = PRIME32;
        for (int i = 0; i < len; i++) {
            buf[i] = (byte) (gen >>> 56);
            gen *= PRIME64;
        }
        return buf;
    }

    @Test
    void hash_matchesReferenceSanityTable() {
        byte[] buf = sanityBuffer(222);
        assertEquals(0xEF46DB3751D8E999L, XxHash64.hash(buf, 0, 0, 0));
        assertEquals(0xAC75FDA2929B17EFL, XxHash64.hash(buf, 0, 0, PRIME32));
        assertEquals(0xE934A84ADB052768L, XxHash64.hash(buf, 0, 1, 0));
        assertEquals(0x9136A0DCA57457EEL, XxHash64.hash(buf, 0, 4, 0));
        assertEquals(0x8282DCC4994E35C8L, XxHash64.hash(buf, 0, 14, 0));
        assertEquals(0xB641AE8CB691C174L, XxHash64.hash(buf, 0, 222, 0));
    }
}
