// How many bytes a TCP socket has received (Linux TCP_INFO), for the
// connection watchdog of `kindred serve`. Kept apart from the HTTP headers:
// the kernel's <linux/tcp.h>, which has the counter, clashes with the C
// library's <netinet/tcp.h>.
#ifndef KINDRED_CLI_SOCKET_BYTES_H_
#define KINDRED_CLI_SOCKET_BYTES_H_

#include <cstdint>

namespace kindred::cli {

// Bytes received on socket `fd` so far; 0 when the kernel does not say.
uint64_t BytesReceived(int fd);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_SOCKET_BYTES_H_
