"""Reference values for core/tests/series_mseed.rs, decoded by ObsPy (which reads miniSEED
through the libmseed C library) -- a decoder independent of stillsky's.

Run from this folder with ObsPy installed (tested with ObsPy 1.5.1):
    python make_mseed_reference.py
For every mseed/*.mseed file holding one channel it writes mseed/<file>.obspy.csv:
comment lines '# key=value' (id, starttime, sampling_rate, npts, encoding, byteorder), then a
'value' column with every sample as ObsPy returns it (repr, so floats round-trip exactly).
It also splices records 1, 2 and 4 of the Steim-1 file (512-byte records, record 3 left out)
and writes the gap ObsPy's Stream.get_gaps() finds to mseed/gap_reference.csv.
"""
import glob
import io
import os

import obspy

for path in sorted(glob.glob("mseed/*.mseed")):
    st = obspy.read(path, details=True)
    if len(st) != 1:
        continue
    tr = st[0]
    with open(path + ".obspy.csv", "w") as f:
        f.write(f"# id={tr.id}\n")
        f.write(f"# starttime={tr.stats.starttime}\n")
        f.write(f"# sampling_rate={tr.stats.sampling_rate!r}\n")
        f.write(f"# npts={tr.stats.npts}\n")
        f.write(f"# encoding={tr.stats.mseed.encoding}\n")
        f.write(f"# byteorder={tr.stats.mseed.byteorder}\n")
        f.write("value\n")
        for v in tr.data:
            f.write(f"{v.item()!r}\n")

with open("mseed/BW.BGLD..EHE.steim1.10rec.mseed", "rb") as f:
    raw = f.read()
spliced = raw[0:1024] + raw[1536:2048]
st = obspy.read(io.BytesIO(spliced))
gaps = st.get_gaps()
assert len(gaps) == 1, gaps
g = gaps[0]
with open("mseed/gap_reference.csv", "w") as f:
    f.write("# records 1, 2 and 4 of BW.BGLD..EHE.steim1.10rec.mseed; ObsPy Stream.get_gaps()\n")
    f.write("last_sample_before_gap_s,next_sample_s,interval_s,npts_total\n")
    f.write(f"{g[4].timestamp!r},{g[5].timestamp!r},{g[6]!r},{sum(tr.stats.npts for tr in st)}\n")
print("wrote", sorted(os.path.basename(p) for p in glob.glob("mseed/*.csv")))
