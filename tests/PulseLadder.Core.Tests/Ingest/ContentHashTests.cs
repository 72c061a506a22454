using System.Text;
using PulseLadder.Core.Ingest;

namespace PulseLadder.Core.Tests.Ingest;

public class ContentHashTests
{
    // FIPS 180-2 Appendix B.1 test vector: SHA-256("abc").
    private const string AbcSha256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";

    [Fact]
    public void Sha256Hex_MatchesFipsVector_WhenBytes() =>
        Assert.Equal(AbcSha256, ContentHash.Sha256Hex(Encoding.ASCII.GetBytes("abc")));

    [Fact]
    public async Task Sha256Hex_MatchesFipsVector_WhenStream()
    {
        Assert.Equal(AbcSha256, ContentHash.Sha256Hex(new MemoryStream(Encoding.ASCII.GetBytes("abc"))));
        Assert.Equal(AbcSha256, await ContentHash.Sha256HexAsync(new MemoryStream(Encoding.ASCII.GetBytes("abc"))));
    }

    [Fact]
    public void Sha256Hex_Differs_WhenOnlyLineEndsDiffer() =>
        Assert.NotEqual(ContentHash.Sha256Hex("a\nb"u8), ContentHash.Sha256Hex("a\r\nb"u8));
}
