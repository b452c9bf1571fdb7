// The version of the computation engine, stored with every computed result so that a signed
// record can be re-rendered with the numbers it was signed with (DESIGN.md section 2).
// Source: Semantic Versioning 2.0.0 (a change to any computed number is a new minor or major).

export const ENGINE_VERSION = '1.0.0';
