/* sha256.h: SHA-256 message digest (FIPS 180-4), for the model file's fingerprint.
 * No listed dependency provides a hash, so this small one lives here.
 */
#ifndef EF_SHA256_H
#define EF_SHA256_H

#include <stddef.h>
#include <stdint.h>

typedef struct {
    uint32_t h[8];          /* intermediate hash value H(i) */
    uint64_t n_bytes;       /* message length so far */
    unsigned char buf[64];  /* pending block */
    size_t n_buf;
} ef_sha256_state;

void ef_sha256_init(ef_sha256_state *s);
void ef_sha256_update(ef_sha256_state *s, const void *data, size_t len);
void ef_sha256_final(ef_sha256_state *s, unsigned char digest[32]);
/* One call: digest of `len` bytes at `data`. */
void ef_sha256(const void *data, size_t len, unsigned char digest[32]);
/* Lowercase hex text of a digest, NUL-terminated (65 bytes). */
void ef_sha256_hex(const unsigned char digest[32], char hex[65]);

#endif /* EF_SHA256_H */
