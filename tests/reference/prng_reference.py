#!/usr/bin/python3
"""Independent reference of the engine's generators, written from the published algorithms.

- SplitMix64: Steele, Lea & Flood (2014), Fast splittable pseudorandom number generators, OOPSLA 2014
  (state += 0x9e3779b97f4a7c15; output = the "mix" finaliser with shifts 30, 27, 31).
- xoshiro128**: Blackman & Vigna (2021), Scrambled linear pseudorandom number generators,
  ACM TOMS 47(4):36 (result = rotl(s1 * 5, 7) * 9; then the xor/shift/rotate state update).
Seeding as the engine documents it: the four 32-bit words are the high and low halves of the first two
SplitMix64 outputs for the seed (as an unsigned 64-bit integer).

Reads {"seeds": [int, ...], "count": int} and writes {"splitmix": {seed: [hex, ...]},
"xoshiro": {seed: [uint32, ...]}, "doubles": {seed: [float, ...]}}.
"""
import json
import sys

M64 = (1 << 64) - 1
M32 = (1 << 32) - 1


def splitmix64(seed, count):
    s = seed & M64
    out = []
    for _ in range(count):
        s = (s + 0x9E3779B97F4A7C15) & M64
        z = s
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & M64
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & M64
        out.append(z ^ (z >> 31))
    return out


def rotl32(x, k):
    return ((x << k) | (x >> (32 - k))) & M32


def xoshiro128ss(state, count):
    s = list(state)
    out = []
    for _ in range(count):
        result = (rotl32((s[1] * 5) & M32, 7) * 9) & M32
        t = (s[1] << 9) & M32
        s[2] ^= s[0]
        s[3] ^= s[1]
        s[1] ^= s[2]
        s[0] ^= s[3]
        s[2] ^= t
        s[3] = rotl32(s[3], 11)
        out.append(result)
    return out


def main():
    data = json.load(sys.stdin)
    count = data["count"]
    res = {"splitmix": {}, "xoshiro": {}, "doubles": {}}
    for seed in data["seeds"]:
        a, b = splitmix64(seed, 2)
        res["splitmix"][str(seed)] = ["%016x" % v for v in splitmix64(seed, count)]
        state = [a >> 32, a & M32, b >> 32, b & M32]
        words = xoshiro128ss(state, 2 * count)
        res["xoshiro"][str(seed)] = words[:count]
        res["doubles"][str(seed)] = [
            ((words[2 * k] >> 5) * 67108864 + (words[2 * k + 1] >> 6)) / 9007199254740992.0 for k in range(count)
        ]
    json.dump(res, sys.stdout)


if __name__ == "__main__":
    main()
