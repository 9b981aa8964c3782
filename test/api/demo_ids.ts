/**
 * Ids of the demo series (content hashes of fixtures/demo/, the same on every machine).
 *
 * @module
 */
export const SSN = "sha256:adebf4dd9a329b7382165cf603d02c96fa9a2c91a7ba58eb7b8e967337f2ff2b";
export const AREA = "sha256:165c80d17f315d238ae6ee0aacd536a8a8f7484217a18dfb7b7c9ede9ff27f14";
export const MG = "sha256:d4780e80aedd5569ef8292dda45fb2f1372ae0c333d378b2a58a44de47432e10";
export const TSI = "sha256:4de66a40b207591db1232e642ce89992bf2df2f556d26f12ada5d636c0034a0f";
export const TSIM = "sha256:dcd8d0bcd0c66f73a1a079649dbcd55d3d0e247c1329eb803a87767023e8576d";
export const TEMP = "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480";
export const ENSO = "sha256:481ce6e1b9d72efaae13afddd39bedb997b7eebfeb98f820f0c696d890d89d39";
export const AOD = "sha256:1c90d09c4d2ddc23a99dac7abac5521ad06226ec60fd89683fd85a8ff665f8d7";
