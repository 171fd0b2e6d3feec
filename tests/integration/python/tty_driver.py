"""Runs a command on a pseudo-terminal, as a person at a terminal would (tests/integration/remote-cli.test.ts).

usage: tty_driver.py ANSWER COMMAND...
Waits for a progress bar, types Ctrl-C, waits for the question "cancel the job? [y/N]", types
ANSWER and Enter, then reads to the end. Prints one JSON object: the exit code and everything the
terminal showed.
"""

import json
import os
import pty
import select
import sys
import time

answer, command = sys.argv[1], sys.argv[2:]
pid, fd = pty.fork()
if pid == 0:
    os.execvp(command[0], command)

seen = b""
deadline = time.monotonic() + 150


def read_until(pattern):
    global seen
    while pattern not in seen:
        if time.monotonic() > deadline:
            raise SystemExit("timed out waiting for %r; the terminal showed %r" % (pattern, seen[-500:]))
        ready, _, _ = select.select([fd], [], [], 0.5)
        if ready:
            try:
                chunk = os.read(fd, 4096)
            except OSError:
                return False
            if not chunk:
                return False
            seen += chunk
    return True


read_until(b"\r\x1b[2K[")
os.write(fd, b"\x03")
read_until(b"cancel the job? [y/N] ")
os.write(fd, answer.encode() + b"\r")
while True:
    try:
        chunk = os.read(fd, 4096)
    except OSError:
        break
    if not chunk:
        break
    seen += chunk
_, status = os.waitpid(pid, 0)
print(json.dumps({"exit": os.waitstatus_to_exitcode(status), "terminal": seen.decode("utf-8", "replace")}))
