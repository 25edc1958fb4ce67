"""Outside check of the share-link codec (src/app/session/share.ts): base64url (RFC 4648 §5) and raw
deflate (RFC 1951) decoded by Python's base64 and zlib (wbits=-15). Reads JSON {codes: [...]},
prints the decoded JSON texts, and encodes one object the same way for the reverse direction."""
import base64, json, sys, zlib

req = json.load(sys.stdin)
out = []
for code in req["codes"]:
    raw = base64.urlsafe_b64decode(code + "=" * (-len(code) % 4))
    out.append(json.loads(zlib.decompress(raw, -15).decode("utf-8")))
c = zlib.compressobj(9, zlib.DEFLATED, -15)
packed = c.compress(json.dumps(req["encode"]).encode()) + c.flush()
print(json.dumps({"decoded": out, "encoded": "#share=" + base64.urlsafe_b64encode(packed).decode().rstrip("=")}))
