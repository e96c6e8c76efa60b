#!/usr/bin/env python3
"""A small TCP fault proxy for the fault tests: it forwards one listening
address to a target and injects, on every connection through it,

  --delay-ms N       latency: each chunk is delivered N ms after it arrived
                     (order kept, so throughput is not cut);
  --stall-prob P     loss as the application sees it: with probability P a
  --stall-ms M       chunk waits M ms more (a retransmission), holding back
                     the ones behind it, as TCP's in-order delivery does;
  --cut-at S         a link cut: S seconds after start every open connection
  --cut-for T        is reset and new ones are refused for T seconds.

Bounded: it exits by itself after --lifetime seconds (default 120). It
prints "proxy on HOST:PORT" once listening (port 0 picks a free one), and
on stderr, when it ends (lifetime or SIGTERM), what it did: connections
forwarded and refused, chunks, chunks stalled, connections reset.
Standard library only.
"""
import argparse
import asyncio
import random
import signal
import socket
import sys
import time


def parse_address(text):
    host, _, port = text.rpartition(":")
    return host, int(port)


class Faults:
    def __init__(self, args):
        self.args = args
        self.start = time.monotonic()
        self.random = random.Random(args.seed)
        self.open = set()  # writers of every open connection, both sides
        self.counts = {"connections": 0, "refused": 0, "chunks": 0, "stalled": 0, "reset": 0}

    def cut_now(self):
        a = self.args
        if a.cut_at < 0:
            return False
        elapsed = time.monotonic() - self.start
        return a.cut_at <= elapsed < a.cut_at + a.cut_for

    def extra_delay(self):
        a = self.args
        delay = a.delay_ms / 1000.0
        self.counts["chunks"] += 1
        if a.stall_prob > 0 and self.random.random() < a.stall_prob:
            delay += a.stall_ms / 1000.0
            self.counts["stalled"] += 1
        return delay


async def pump(reader, writer, faults):
    """Copies reader to writer, each chunk held back by the faults' delay."""
    queue = asyncio.Queue()

    async def read():
        while True:
            data = await reader.read(65536)
            await queue.put((time.monotonic() + faults.extra_delay(), data))
            if not data:
                return

    async def write():
        due_last = 0.0
        while True:
            due, data = await queue.get()
            due = max(due, due_last)  # in order, as TCP delivers
            due_last = due
            wait = due - time.monotonic()
            if wait > 0:
                await asyncio.sleep(wait)
            if not data:
                if writer.can_write_eof():
                    writer.write_eof()
                return
            writer.write(data)
            await writer.drain()

    try:
        await asyncio.gather(read(), write())
    except (ConnectionError, OSError, asyncio.IncompleteReadError):
        pass
    finally:
        writer.close()


def reset(writer):
    """Closes with a reset (SO_LINGER 0), as a cut link looks to a peer."""
    sock = writer.get_extra_info("socket")
    if sock is not None:
        try:
            sock.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, b"\x01\x00\x00\x00\x00\x00\x00\x00")
        except OSError:
            pass
    writer.transport.abort()


async def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("listen")
    p.add_argument("target")
    p.add_argument("--delay-ms", type=float, default=0)
    p.add_argument("--stall-prob", type=float, default=0)
    p.add_argument("--stall-ms", type=float, default=200)
    p.add_argument("--cut-at", type=float, default=-1)
    p.add_argument("--cut-for", type=float, default=0)
    p.add_argument("--lifetime", type=float, default=120)
    p.add_argument("--seed", type=int, default=1)
    args = p.parse_args()
    faults = Faults(args)
    target_host, target_port = parse_address(args.target)

    async def serve(client_reader, client_writer):
        if faults.cut_now():
            faults.counts["refused"] += 1
            reset(client_writer)
            return
        faults.counts["connections"] += 1
        try:
            server_reader, server_writer = await asyncio.open_connection(target_host, target_port)
        except OSError:
            reset(client_writer)
            return
        faults.open.update({client_writer, server_writer})
        try:
            await asyncio.gather(pump(client_reader, server_writer, faults),
                                 pump(server_reader, client_writer, faults))
        finally:
            faults.open.difference_update({client_writer, server_writer})

    async def cutter():
        if args.cut_at < 0:
            return
        await asyncio.sleep(args.cut_at)
        for w in list(faults.open):
            faults.counts["reset"] += 1
            reset(w)
        faults.open.clear()

    host, port = parse_address(args.listen)
    server = await asyncio.start_server(serve, host, port)
    bound = server.sockets[0].getsockname()
    print(f"proxy on {bound[0]}:{bound[1]}", flush=True)
    asyncio.ensure_future(cutter())
    report = lambda: print(" ".join(f"{k} {v}" for k, v in faults.counts.items()),
                           file=sys.stderr, flush=True)
    loop = asyncio.get_running_loop()
    loop.add_signal_handler(signal.SIGTERM, lambda: (report(), sys.exit(0)))
    await asyncio.sleep(args.lifetime)
    report()
    server.close()


if __name__ == "__main__":
    try:
        asyncio.run(main())
    except KeyboardInterrupt:
        sys.exit(0)
