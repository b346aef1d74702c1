# Reads characters' advance widths, in ems, from a TrueType font's cmap
# (format 4) and hmtx tables, with Python's standard library only. It made
# dejavu_advance_widths.txt, the figures behind web/chart's labelEm:
#
#   for f in DejaVuSans DejaVuSans-Bold; do
#     python3 testdata/fonts/advance_widths.py /usr/share/fonts/truetype/dejavu/$f.ttf
#   done
import struct, sys
def widths(path, chars):
    d = open(path, 'rb').read()
    n = struct.unpack('>H', d[4:6])[0]
    tables = {}
    for i in range(n):
        tag, _, off, ln = struct.unpack('>4sIII', d[12+16*i:28+16*i])
        tables[tag.decode()] = (off, ln)
    upem = struct.unpack('>H', d[tables['head'][0]+18:tables['head'][0]+20])[0]
    nhm = struct.unpack('>H', d[tables['hhea'][0]+34:tables['hhea'][0]+36])[0]
    co = tables['cmap'][0]
    nsub = struct.unpack('>H', d[co+2:co+4])[0]
    sub = None
    for i in range(nsub):
        pid, eid, off = struct.unpack('>HHI', d[co+4+8*i:co+12+8*i])
        if pid == 3 and eid == 1:
            sub = co + off
    assert struct.unpack('>H', d[sub:sub+2])[0] == 4
    segx2 = struct.unpack('>H', d[sub+6:sub+8])[0]; seg = segx2 // 2
    ends = struct.unpack('>%dH' % seg, d[sub+14:sub+14+segx2])
    starts = struct.unpack('>%dH' % seg, d[sub+16+segx2:sub+16+2*segx2])
    deltas = struct.unpack('>%dh' % seg, d[sub+16+2*segx2:sub+16+3*segx2])
    roff_at = sub+16+3*segx2
    roffs = struct.unpack('>%dH' % seg, d[roff_at:roff_at+segx2])
    def gid(c):
        c = ord(c)
        for i in range(seg):
            if starts[i] <= c <= ends[i]:
                if roffs[i] == 0:
                    return (c + deltas[i]) & 0xFFFF
                a = roff_at + 2*i + roffs[i] + 2*(c - starts[i])
                g = struct.unpack('>H', d[a:a+2])[0]
                return (g + deltas[i]) & 0xFFFF if g else 0
        return 0
    ho = tables['hmtx'][0]
    out = {}
    for ch in chars:
        g = min(gid(ch), nhm-1)
        out[ch] = struct.unpack('>H', d[ho+4*g:ho+4*g+2])[0] / upem
    return out
chars = sys.argv[2] if len(sys.argv) > 2 else "0123456789.,-% abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
print("#", sys.argv[1].rsplit("/", 1)[-1])
for ch, w in widths(sys.argv[1], chars).items():
    print(repr(ch), round(w, 4))
