// Internal: a stream of gzip members (RFC 1952), one after another,
// decompressed.
//
// A member that is whole in the input buffer (at most kWholeMemberInput
// compressed bytes, kWholeMemberOutput decoded bytes, no header CRC or
// reserved flags) is decompressed in one call by libdeflate; any other
// member, and any member libdeflate does not decode, is inflated by zlib as
// a stream from its first byte, so that every error (and its message and
// byte offset) is zlib's. Both check each member's CRC-32 and ISIZE, so the
// bytes out are the same either way. Memory: the input buffer and the
// decoded buffer of one member, each bounded by the limits above.
//
// Not thread-safe; one reader per stream.
#ifndef KINDRED_IO_GZIP_STREAM_H_
#define KINDRED_IO_GZIP_STREAM_H_

#include <memory>
#include <string>

#include "io/byte_stream.h"

namespace kindred::io {

inline constexpr size_t kWholeMemberInput = 4 << 20;
inline constexpr size_t kWholeMemberOutput = 16 << 20;

// `raw`: the compressed bytes; `name`: the file's name in messages
// ("<name>: corrupt gzip stream near byte N: ...", "<name>: truncated gzip
// stream after N bytes"). The stream answers MemberAt for the members it
// started recently (the last 4,096).
std::unique_ptr<ByteStream> MakeGzipStream(std::unique_ptr<ByteStream> raw, std::string name);

}  // namespace kindred::io

#endif  // KINDRED_IO_GZIP_STREAM_H_
