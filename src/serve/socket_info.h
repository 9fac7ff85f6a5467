// Socket facts and settings for `kindred serve` that cpp-httplib does not
// expose. Kept apart from the HTTP headers: the kernel's <linux/tcp.h>,
// which has the byte counter, clashes with the C library's <netinet/tcp.h>.
#ifndef KINDRED_SERVE_SOCKET_INFO_H_
#define KINDRED_SERVE_SOCKET_INFO_H_

#include <cstdint>

namespace kindred::serve {

// Bytes received on socket `fd` so far; 0 when the kernel does not say.
uint64_t BytesReceived(int fd);

// Sets the accept backlog of every listening socket of this process to
// `backlog` (cpp-httplib 0.11 listens with a backlog of 5, so a burst of
// new connections has SYNs dropped and retried a second later).
void WidenListenBacklogs(int backlog);

}  // namespace kindred::serve

#endif  // KINDRED_SERVE_SOCKET_INFO_H_
