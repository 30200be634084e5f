#!/usr/bin/env python3
"""Symbolic expansion, the alternative a user would otherwise reach for: decide each identity of a catalogue by
sympy's expand(lhs - rhs) == 0 (Debian's python3-sympy), and time it beside `idq` screening the same candidates.

Usage: python3 tests/bench/sympy_compare.py CATALOGUE.idq [N=1000] [--timeout SECONDS=20] [--idq "dotnet path/idq.dll"]
Only the subset of the catalogue syntax that the synthetic generator writes is translated: + - * / ^, names, x[i],
sum/prod over integer ranges, matrix comprehensions, det, binom. A candidate that takes sympy longer than the timeout
counts with the timeout as its time (so the reported sympy time is a lower bound).
"""
import os
import re
import signal
import subprocess
import sys
import tempfile
import time

import sympy

TOKEN = re.compile(r"\s*(?:(\d+)|([A-Za-z_][A-Za-z_0-9]*)|(\.\.|[-+*/^()\[\],:=]))")


class Parser:
    def __init__(self, text, symbols):
        self.toks = []
        pos = 0
        text = text.strip()
        while pos < len(text):
            m = TOKEN.match(text, pos)
            if not m:
                raise ValueError(f"cannot read {text[pos:pos+10]!r}")
            self.toks.append(m.group(1) or m.group(2) or m.group(3))
            pos = m.end()
        self.i = 0
        self.symbols = symbols

    def peek(self):
        return self.toks[self.i] if self.i < len(self.toks) else None

    def take(self, expected=None):
        t = self.toks[self.i]
        if expected and t != expected:
            raise ValueError(f"expected {expected}, got {t}")
        self.i += 1
        return t

    def identity(self):
        env = {}
        left = self.expr(env)
        self.take("=")
        right = self.expr(env)
        return left, right

    def expr(self, env):
        value = self.term(env)
        while self.peek() in ("+", "-"):
            value = value + self.term(env) if self.take() == "+" else value - self.term(env)
        return value

    def term(self, env):
        value = self.unary(env)
        while self.peek() in ("*", "/"):
            value = value * self.unary(env) if self.take() == "*" else value / self.unary(env)
        return value

    def unary(self, env):
        if self.peek() == "-":
            self.take()
            return -self.unary(env)
        return self.power(env)

    def power(self, env):
        base = self.atom(env)
        if self.peek() == "^":
            self.take()
            return base ** self.unary(env)
        return base

    def range(self, env):
        name = self.take()
        self.take("in")
        start = self.expr(env)
        self.take("..")
        end = self.expr(env)
        return name, int(start), int(end)

    def atom(self, env):
        t = self.take()
        if t == "(":
            value = self.expr(env)
            self.take(")")
            return value
        if t.isdigit():
            return sympy.Integer(int(t))
        if t in ("sum", "prod"):
            self.take("(")
            name, a, b = self.range(env)
            self.take(":")
            start = self.i
            acc = sympy.Integer(0 if t == "sum" else 1)
            for k in range(a, b + 1):
                self.i = start
                v = self.expr({**env, name: sympy.Integer(k)})
                acc = acc + v if t == "sum" else acc * v
            if a > b:
                self.skip_expr(env, name)
            self.take(")")
            return acc
        if t == "matrix":
            self.take("(")
            ri, r0, r1 = self.range(env)
            self.take(",")
            cj, c0, c1 = self.range(env)
            self.take(":")
            start = self.i
            rows = []
            for i in range(r0, r1 + 1):
                row = []
                for j in range(c0, c1 + 1):
                    self.i = start
                    row.append(self.expr({**env, ri: sympy.Integer(i), cj: sympy.Integer(j)}))
                rows.append(row)
            self.take(")")
            return sympy.Matrix(rows)
        if t == "det":
            self.take("(")
            m = self.expr(env)
            self.take(")")
            return m.det()
        if t == "binom":
            self.take("(")
            a = self.expr(env)
            self.take(",")
            k = int(self.expr(env))
            self.take(")")
            return sympy.expand_func(sympy.binomial(a, k)) if k >= 0 else sympy.Integer(0)
        if t in env:
            return env[t]
        if self.peek() == "[":
            self.take("[")
            idx = [int(self.expr(env))]
            while self.peek() == ",":
                self.take()
                idx.append(int(self.expr(env)))
            self.take("]")
            t = f"{t}[{','.join(map(str, idx))}]"
        return self.symbols.setdefault(t, sympy.Symbol(t))

    def skip_expr(self, env, name):
        self.expr({**env, name: sympy.Integer(0)})


class Timeout(Exception):
    pass


def on_alarm(signum, frame):
    raise Timeout()


def main():
    args = sys.argv[1:]
    timeout = 20
    idq = None
    if "--timeout" in args:
        k = args.index("--timeout"); timeout = int(args[k + 1]); del args[k:k + 2]
    if "--idq" in args:
        k = args.index("--idq"); idq = args[k + 1].split(); del args[k:k + 2]
    path = args[0]
    n = int(args[1]) if len(args) > 1 else 1000
    lines = [l for l in open(path) if l.strip() and not l.startswith("#")][:n]
    signal.signal(signal.SIGALRM, on_alarm)
    total = 0.0
    timeouts = 0
    verdicts = {}
    for line in lines:
        label, body = line.split(":", 1)
        t0 = time.perf_counter()
        signal.alarm(timeout)
        try:
            left, right = Parser(body, {}).identity()
            verdicts[label] = "survived" if sympy.expand(left - right) == 0 else "refuted"
        except Timeout:
            timeouts += 1
            verdicts[label] = "timeout"
        finally:
            signal.alarm(0)
        total += min(time.perf_counter() - t0, timeout)
        done = len(verdicts)
        if done % 50 == 0:
            print(f"  sympy: {done} of {len(lines)} in {total:.0f} s ({timeouts} timeouts)", file=sys.stderr, flush=True)
    print(f"sympy {sympy.__version__}: {len(lines)} candidates in {total:.1f} s ({timeouts} hit the {timeout} s limit)")
    if idq:
        with tempfile.TemporaryDirectory() as d:
            cat = os.path.join(d, "c.idq")
            db = os.path.join(d, "c.db")
            open(cat, "w").writelines(lines)
            t0 = time.perf_counter()
            subprocess.run(idq + ["init", "--db", db], check=True, capture_output=True)
            subprocess.run(idq + ["import", cat, "--db", db, "--seed", "1"], check=True, capture_output=True)
            subprocess.run(idq + ["run", "--db", db], check=True, capture_output=True)
            elapsed = time.perf_counter() - t0
            import sqlite3
            got = dict(sqlite3.connect(db).execute("select label, state from verdicts"))
        agree = sum(1 for k, v in verdicts.items() if v != "timeout" and got.get(k) == v)
        decided = sum(1 for v in verdicts.values() if v != "timeout")
        print(f"idq: {len(lines)} candidates in {elapsed:.1f} s (init + import + run, processes included); "
              f"verdicts agree with sympy on {agree} of the {decided} sympy decided")
        print(f"ratio sympy / idq: {total / elapsed:.0f}x (at least, with timeouts counted at the limit)")


if __name__ == "__main__":
    main()
