namespace PulseLadder.Demo;

/// <summary>
/// xoshiro256** (Blackman and Vigna 2018) seeded through SplitMix64: a fixed algorithm, so a seed gives the same
/// numbers on every runtime and platform (System.Random's algorithm is an implementation detail).
/// </summary>
internal sealed class DemoRandom
{
    private ulong _s0, _s1, _s2, _s3;

    /// <param name="seed">User seed.</param>
    /// <param name="stream">Independent stream number, so one purpose's draws do not shift another's.</param>
    public DemoRandom(ulong seed, ulong stream)
    {
        ulong x = seed ^ (stream * 0xD1B54A32D192ED03UL);
        _s0 = SplitMix(ref x);
        _s1 = SplitMix(ref x);
        _s2 = SplitMix(ref x);
        _s3 = SplitMix(ref x);
    }

    private static ulong SplitMix(ref ulong x)
    {
        ulong z = x += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    public ulong NextUInt64()
    {
        ulong result = RotateLeft(_s1 * 5, 7) * 9;
        ulong t = _s1 << 17;
        _s2 ^= _s0;
        _s3 ^= _s1;
        _s1 ^= _s2;
        _s0 ^= _s3;
        _s2 ^= t;
        _s3 = RotateLeft(_s3, 45);
        return result;
    }

    private static ulong RotateLeft(ulong x, int k) => (x << k) | (x >> (64 - k));

    /// <summary>Uniform in [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / (1UL << 53));

    public double Uniform(double min, double max) => min + (max - min) * NextDouble();

    /// <summary>Uniform integer in [0, n).</summary>
    public int NextInt(int n) => (int)(NextDouble() * n);

    public bool Chance(double p) => NextDouble() < p;

    private double _spareNormal;
    private bool _hasSpare;

    /// <summary>Standard normal deviate (Box-Muller; the second deviate of each pair is kept for the next call).</summary>
    public double Normal()
    {
        if (_hasSpare)
        {
            _hasSpare = false;
            return _spareNormal;
        }
        double u1 = 1.0 - NextDouble();
        double u2 = NextDouble();
        double r = Math.Sqrt(-2.0 * Math.Log(u1));
        var (sin, cos) = Math.SinCos(2 * Math.PI * u2);
        _spareNormal = r * sin;
        _hasSpare = true;
        return r * cos;
    }

    public double Normal(double mean, double sigma) => mean + sigma * Normal();

    public void Shuffle<T>(IList<T> list)
    {
        for (int i = list.Count - 1; i > 0; i--)
        {
            int j = NextInt(i + 1);
            (list[i], list[j]) = (list[j], list[i]);
        }
    }
}
