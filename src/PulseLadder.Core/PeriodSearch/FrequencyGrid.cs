using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>A regular frequency grid f_k = F0 + k Df, k in [0, Count) (cycles/day).</summary>
internal readonly record struct FrequencyGrid(double F0, double Df, int Count, bool Capped)
{
    /// <summary>Hard cap on the grid size whatever the settings say (memory guard).</summary>
    public const int MaxCount = 5_000_000;

    /// <summary>The coarsest oversampling allowed: a grid coarser than 1/(5T) can miss a peak (SCIENCE.md 1.5).</summary>
    public const double MinOversampling = 5;

    public double FMax => F0 + (Count - 1) * Df;
    public double At(int k) => F0 + k * Df;

    /// <summary>Period range (days) searched for a class (SCIENCE.md 1.5); null bounds mean "from the baseline".</summary>
    public static (double MinP, double MaxP) PeriodRange(PulsatorClass cls) => cls switch
    {
        // Fundamental-mode classical Cepheids 1-100 d; a little margin below 1 d for the shortest LMC ones.
        PulsatorClass.ClassicalCepheidFundamental => (0.8, 100),
        // First overtone: down to ~0.25 d in the LMC, rarely above ~6 d.
        PulsatorClass.ClassicalCepheidFirstOvertone => (0.25, 10),
        PulsatorClass.TypeIICepheid => (0.8, 100),
        PulsatorClass.RRLyraeAB or PulsatorClass.RRLyraeC => (0.2, 1.0),
        _ => (0.2, 100),
    };

    /// <summary>
    /// Builds the grid for baseline <paramref name="baseline"/> (days). f_min = 1/P_max (class default P_max capped at T), f_max = 1/P_min,
    /// Df = 1/(n0 T) with n0 at least <see cref="MinOversampling"/>. Null when the range is empty (baseline shorter
    /// than the shortest period searched).
    /// </summary>
    public static FrequencyGrid? Build(double baseline, PulsatorClass cls, PeriodSearchSettings s)
    {
        if (!(baseline > 0) || !double.IsFinite(baseline)) return null;
        var (minP, maxP) = PeriodRange(cls);
        if (s.MinPeriodDays is { } a && a > 0 && double.IsFinite(a)) minP = a;
        // An explicit maximum period is honoured; the class default stops at the baseline (longer periods are not constrained).
        if (s.MaxPeriodDays is { } b && b > 0 && double.IsFinite(b)) maxP = b;
        else maxP = Math.Min(maxP, baseline);
        if (!(maxP > minP)) return null;
        double n0 = s.Oversampling is > 0 and < 1e4 ? Math.Max(s.Oversampling, MinOversampling) : 10;
        double df = 1.0 / (n0 * baseline);
        double f0 = 1.0 / maxP, f1 = 1.0 / minP;
        double count = Math.Floor((f1 - f0) / df) + 1;
        bool capped = false;
        int cap = Math.Clamp(s.MaxFrequencies, 1000, MaxCount);
        if (count > cap)
        {
            capped = true;
            count = cap;
            df = (f1 - f0) / (cap - 1);
        }
        if (count < 3) return null;
        return new FrequencyGrid(f0, df, (int)count, capped);
    }
}
