using PulseLadder.Core.Quantities;

namespace PulseLadder.Core.Photometry;

/// <summary>What the star list says about a star.</summary>
/// <param name="Name">Star name, unique within the campaign.</param>
/// <param name="Field">Field the star belongs to.</param>
/// <param name="Position">ICRS position.</param>
/// <param name="DeclaredClass">Class given by the star list (wins over any suggestion), or null.</param>
/// <param name="Ebv">Colour excess E(B-V) in magnitudes, or null.</param>
/// <param name="EbvErr">Error of <paramref name="Ebv"/>, or null.</param>
/// <param name="FeH">Metallicity [Fe/H] in dex, or null.</param>
public sealed record StarInfo(
    string Name,
    string Field,
    SkyPosition Position,
    PulsatorClass? DeclaredClass = null,
    double? Ebv = null,
    double? EbvErr = null,
    double? FeH = null);
