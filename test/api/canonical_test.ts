import assert from "node:assert/strict";
import { canonicalJson, sha256Hex } from "../../api/canonical.ts";

Deno.test("canonicalJson() follows RFC 8785", async (t) => {
  await t.step("keys sorted by UTF-16 code units, no whitespace", () => {
    // RFC 8785 §3.2.3: property sorting by UTF-16 code units
    assert.equal(
      canonicalJson({ "€": 1, "\r": 2, "1": 3, a: { z: 1, b: [true, null] } }),
      '{"\\r":2,"1":3,"a":{"b":[true,null],"z":1},"€":1}',
    );
  });
  await t.step("numbers use ECMAScript formatting (RFC 8785 §3.2.2.3 examples)", () => {
    assert.equal(
      canonicalJson([1e21, 1e-7, 0.000001, -0, 333333333.33333329, 4.5e-324]),
      "[1e+21,1e-7,0.000001,0,333333333.3333333,5e-324]",
    );
  });
  await t.step("NaN and Infinity are refused", () => {
    assert.throws(() => canonicalJson([NaN]), RangeError);
    assert.throws(() => canonicalJson({ a: -Infinity }), RangeError);
  });
});

Deno.test("sha256Hex() matches the FIPS 180-4 examples", () => {
  // FIPS 180-4 example messages (the standard's published SHA-256 examples)
  assert.equal(sha256Hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  assert.equal(
    sha256Hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
    "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1",
  );
});
