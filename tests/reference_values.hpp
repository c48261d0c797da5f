#pragma once
// Published reference values used by the tests, each with its source. Strings marked
// "from memory" were recalled, not copied from a document at hand; each is also confirmed
// independently inside the project (certified enclosures, or the cascade of a concrete map).
namespace renorm::test_ref {

// alpha for z = 2, 105 significant digits. Source: OEIS A006891 (computations of Briggs 1997 and
// Broadhurst 1999), as quoted in a public reference script that cites them; the same digits
// were recalled from memory before the quote was found.
inline constexpr const char* alpha_z2 =
    "2.50290787509589282228390287321821578638127137672714997733619205677923546317959020670329964974643383412959";

// delta for z = 2, 101 significant digits. Source: OEIS A006890 (Briggs, Math. Comp. 57 (1991);
// Broadhurst 1999). From memory; confirmed by this project's certified enclosure (certify/).
inline constexpr const char* delta_z2 =
    "4.6692016091029906718532038204662016172581855774757686327456513430041343302113147371386897440239480138";

// The 30-decimal string of delta that circulates with a wrong tail (e.g. quoted as "OEIS
// A006890 to 30 decimal places" on several public pages): correct only to 27 significant
// digits. Tests check that we do not reproduce it.
inline constexpr const char* delta_z2_wrong_circulating = "4.669201609102990671853203821578";

// z = 4 and z = 6: Briggs, "A precise calculation of the Feigenbaum constants",
// Math. Comp. 57 (1991), table of delta and alpha for maps with a maximum of order z.
// From memory, 19 significant digits each; OEIS A195102 lists alpha for z = 4.
inline constexpr const char* alpha_z4 = "1.690302971405244853";
inline constexpr const char* delta_z4 = "7.284686217073343364";
inline constexpr const char* alpha_z6 = "1.467742450319900944";
inline constexpr const char* delta_z6 = "9.296246832771370082";

} // namespace renorm::test_ref
