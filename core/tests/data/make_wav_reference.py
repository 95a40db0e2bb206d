"""Write a small WAV with the Python standard library `wave` module (a writer independent of
the Rust `hound` crate) and the expected samples, for core/tests/series_wav.rs.

Run from this folder:  python3 make_wav_reference.py
Output: wav_stdlib_16bit_3ch.wav (16-bit PCM, 3 channels, 500 Hz, 100 frames) and
wav_stdlib_16bit_3ch.csv (per frame: the three samples as integer counts and as a fraction of
full scale, counts / 32768).
"""
import math
import struct
import wave

FS = 500
N = 100
frames = []
for i in range(N):
    a = int(round(20000 * math.sin(2 * math.pi * 7 * i / FS)))
    b = (i * 977) % 65536 - 32768  # covers the full int16 range, including -32768
    c = -i * 300
    frames.append((a, b, c))

with wave.open("wav_stdlib_16bit_3ch.wav", "wb") as w:
    w.setnchannels(3)
    w.setsampwidth(2)
    w.setframerate(FS)
    w.writeframes(b"".join(struct.pack("<3h", *f) for f in frames))

# Read it back with the same module to make sure the file says what we wrote.
with wave.open("wav_stdlib_16bit_3ch.wav", "rb") as r:
    assert (r.getnchannels(), r.getsampwidth(), r.getframerate(), r.getnframes()) == (3, 2, FS, N)
    raw = r.readframes(N)
    assert list(struct.iter_unpack("<3h", raw)) == frames

with open("wav_stdlib_16bit_3ch.csv", "w") as f:
    f.write("c1,c2,c3,f1,f2,f3\n")
    for fr in frames:
        f.write(",".join(str(v) for v in fr) + "," + ",".join(repr(v / 32768) for v in fr) + "\n")
