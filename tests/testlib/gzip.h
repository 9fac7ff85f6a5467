// Test-only: gzip members made by zlib, the independent writer the readers'
// tests decode.
#ifndef KINDRED_TESTS_TESTLIB_GZIP_H_
#define KINDRED_TESTS_TESTLIB_GZIP_H_

#include <string>

namespace kindred::testing {

// One gzip member (RFC 1952) of `data`, made by zlib's deflate (level 6).
std::string GzipMember(const std::string& data);

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_GZIP_H_
