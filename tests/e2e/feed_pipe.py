"""Feeds a named pipe one text per reading, for tests of an input that changes
between two readings: FIFO FIRST SECOND.

The second text is written only once the first reader has closed the pipe,
seen as an inotify close event on the pipe (inotify(7)), so the two texts
never run together however slowly the reader reads: no polling, no timing."""
import ctypes
import os
import sys

IN_CLOSE_NOWRITE = 0x10  # <sys/inotify.h>

fifo, first, second = sys.argv[1:4]
libc = ctypes.CDLL(None, use_errno=True)
watch = libc.inotify_init()
if watch < 0 or libc.inotify_add_watch(watch, fifo.encode(), IN_CLOSE_NOWRITE) < 0:
    sys.exit(f"feed_pipe: inotify: {os.strerror(ctypes.get_errno())}")
for path, then_wait in ((first, True), (second, False)):
    with open(path, "rb") as source, open(fifo, "wb") as pipe:  # blocks until a reader opens
        pipe.write(source.read())
    if then_wait:
        os.read(watch, 4096)  # blocks until the reader closes its end
