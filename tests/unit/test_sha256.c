/* test_sha256.c: SHA-256 against the published test vectors. */
#include <stdlib.h>
#include <string.h>

#include "support.h"
#include "sha256.h"

static void check_hex(const void *data, size_t len, const char *want)
{
    unsigned char d[32];
    char hex[65];
    ef_sha256(data, len, d);
    ef_sha256_hex(d, hex);
    assert_string_equal(hex, want);
}

/* FIPS 180-2, Appendix B.1: one-block message "abc". */
static void test_sha256_abc_matches_fips_180_2_b1(void **state)
{
    (void)state;
    check_hex("abc", 3, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

/* FIPS 180-2, Appendix B.2: two-block 448-bit message (padding spills into a block). */
static void test_sha256_two_block_message_matches_fips_180_2_b2(void **state)
{
    (void)state;
    const char *msg = "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq";
    check_hex(msg, strlen(msg),
              "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

/* FIPS 180-2, Appendix B.3: one million 'a', fed in uneven pieces through update(). */
static void test_sha256_million_a_in_pieces_matches_fips_180_2_b3(void **state)
{
    (void)state;
    char *buf = malloc(1000000);
    assert_non_null(buf);
    memset(buf, 'a', 1000000);
    ef_sha256_state s;
    unsigned char d[32];
    char hex[65];
    ef_sha256_init(&s);
    size_t done = 0, piece = 1;
    while (done < 1000000) {
        size_t n = piece < 1000000 - done ? piece : 1000000 - done;
        ef_sha256_update(&s, buf + done, n);
        done += n;
        piece = piece * 3 % 997 + 1;          /* 1..997 bytes: crosses block edges */
    }
    ef_sha256_final(&s, d);
    ef_sha256_hex(d, hex);
    assert_string_equal(hex, "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
    free(buf);
}

/* Empty message: value computed with Python's hashlib.sha256(b"").hexdigest(). */
static void test_sha256_empty_message(void **state)
{
    (void)state;
    check_hex("", 0, "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

/* Messages of 55, 56 and 64 bytes sit on the padding edges: one-shot and byte-at-a-time
 * digests must agree (property). */
static void test_sha256_padding_edges_agree_between_one_shot_and_bytewise(void **state)
{
    (void)state;
    unsigned char msg[130];
    for (int i = 0; i < 130; i++) msg[i] = (unsigned char)(i * 37 + 11);
    const size_t lens[] = {55, 56, 63, 64, 65, 119, 120, 128};
    for (size_t k = 0; k < sizeof lens / sizeof lens[0]; k++) {
        unsigned char a[32], b[32];
        ef_sha256(msg, lens[k], a);
        ef_sha256_state s;
        ef_sha256_init(&s);
        for (size_t i = 0; i < lens[k]; i++) ef_sha256_update(&s, msg + i, 1);
        ef_sha256_final(&s, b);
        assert_memory_equal(a, b, 32);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_sha256_abc_matches_fips_180_2_b1),
        cmocka_unit_test(test_sha256_two_block_message_matches_fips_180_2_b2),
        cmocka_unit_test(test_sha256_million_a_in_pieces_matches_fips_180_2_b3),
        cmocka_unit_test(test_sha256_empty_message),
        cmocka_unit_test(test_sha256_padding_edges_agree_between_one_shot_and_bytewise),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
