/**
 * What the request examples of the API reference ("Try it out") are made of: the demo series
 * by content id (the SYNTHETIC demo scenario every fresh instance loads, fixtures/demo; a
 * content id is the same on every machine), and the one placeholder for a run id.
 *
 * A run id cannot be stable (a UUIDv7 holds its creation time), so no example can name a real
 * run. Examples use the series form of an input wherever an analysis offers one (a TSI series
 * instead of a reconstruction run, dates instead of a cycles run); where a run is the only
 * way (a reconstruction cites a calibrated model) the example holds {@link EXAMPLE_RUN_ID},
 * which is plainly not a real run: the answer is a problem saying that no run has that id,
 * and the field's description says which run to make first. The test of every example
 * (test/api/openapi_examples_test.ts) puts the id of a run made from the upstream example in
 * its place.
 *
 * @module
 */

/** Content ids of the demo series (fixtures/demo, invented data). */
export const DEMO_SERIES = {
  /** monthly sunspot number, version 2 */
  SSN: "sha256:adebf4dd9a329b7382165cf603d02c96fa9a2c91a7ba58eb7b8e967337f2ff2b",
  /** daily total sunspot area */
  AREA: "sha256:165c80d17f315d238ae6ee0aacd536a8a8f7484217a18dfb7b7c9ede9ff27f14",
  /** daily facular index */
  MG: "sha256:d4780e80aedd5569ef8292dda45fb2f1372ae0c333d378b2a58a44de47432e10",
  /** daily TSI */
  TSI: "sha256:4de66a40b207591db1232e642ce89992bf2df2f556d26f12ada5d636c0034a0f",
  /** monthly TSI composite */
  TSIM: "sha256:dcd8d0bcd0c66f73a1a079649dbcd55d3d0e247c1329eb803a87767023e8576d",
  /** monthly temperature anomaly */
  TEMP: "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480",
  /** monthly ENSO index */
  ENSO: "sha256:481ce6e1b9d72efaae13afddd39bedb997b7eebfeb98f820f0c696d890d89d39",
  /** monthly aerosol optical depth */
  AOD: "sha256:1c90d09c4d2ddc23a99dac7abac5521ad06226ec60fd89683fd85a8ff665f8d7",
} as const;

/** Content id of the demo's gridded field (monthly 10° near-surface air temperature). */
export const DEMO_FIELD =
  "field:sha256:9e638701b97f5a020c0525c24628808eb8c395b5e326730a4bd06c7f2e710b35";

/**
 * The placeholder where an example needs the id of a run: the all-zero UUIDv7 (version 7,
 * variant bits set), which no run ever has.
 */
export const EXAMPLE_RUN_ID = "00000000-0000-7000-8000-000000000000";

/**
 * Four bands of the demo spectral record (200–220, 300–320, 500–525 and 1400–1600 nm) with
 * their series' content ids, as a spectral model request takes them
 * (fixtures/demo/spectral_bands.json has all 32).
 */
export const DEMO_SPECTRAL_BANDS = [
  {
    lower: 200,
    upper: 220,
    series: "sha256:b989ef8e13c3dce25198aaf9155f57dba2253578507d2fadc1fb0b8f0b063905",
  },
  {
    lower: 300,
    upper: 320,
    series: "sha256:4e17ecd16fade0f65dff51c4bc4c06609ec7962eb9281768d6dab86bf1d6fccc",
  },
  {
    lower: 500,
    upper: 525,
    series: "sha256:e5d8a5fcccb0ef089a35e811816e075c87e815990ea0c875cd07689ab46276fb",
  },
  {
    lower: 1400,
    upper: 1600,
    series: "sha256:1f52459e170206d5818e5d69511952de300e4359e0936cdddaa270a4f74fc977",
  },
] as const;
