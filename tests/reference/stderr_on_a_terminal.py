#!/usr/bin/python3
"""Runs a command with its standard error on a pseudo-terminal (Python's pty
module, the standard library's way to give a child a terminal) and its
standard output on a pipe, and prints what reached the terminal, with each
carriage return shown as a new line, so that a test can read the progress
lines a person would see.

Usage: stderr_on_a_terminal.py PROGRAM [ARGS...]
Prints the terminal's text; exits with the program's exit status.
"""
import os
import pty
import subprocess
import sys


def main():
    leader, follower = pty.openpty()
    child = subprocess.Popen(sys.argv[1:], stdin=subprocess.DEVNULL, stdout=subprocess.PIPE, stderr=follower)
    os.close(follower)
    seen = b""
    while True:
        try:
            chunk = os.read(leader, 4096)
        except OSError:  # the child closed its end (EIO on Linux)
            break
        if not chunk:
            break
        seen += chunk
    child.stdout.read()
    status = child.wait()
    os.close(leader)
    sys.stdout.write(seen.decode("utf-8", "replace").replace("\r\n", "\n").replace("\r", "\n"))
    sys.exit(status)


if __name__ == "__main__":
    main()
