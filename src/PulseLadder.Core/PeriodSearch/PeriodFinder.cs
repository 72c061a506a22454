using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Kernels;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>Settings of the period search.</summary>
public sealed record PeriodSearchSettings
{
    /// <summary>Grid oversampling n0: frequency step 1/(n0 T). Values below 5 are raised to 5 (a grid coarser than
    /// 1/(5T) can miss the peak); non-positive or absurd values fall back to 10. The default 5 is the low end of the
    /// usual 5-10 (VanderPlas 2018, ApJS 236, 16): every candidate peak is then maximised on a local grid down to
    /// 1/256 of the step (see PeriodSearchEngine.RefinePeak), so the coarse grid only has to find the peaks, and
    /// the grid (half the kernel time of the whole pipeline) costs half of what n0 = 10 costs.</summary>
    public double Oversampling { get; init; } = 5;
    /// <summary>Shortest period searched (days); null: from the class, else 0.2 d.</summary>
    public double? MinPeriodDays { get; init; }
    /// <summary>Longest period searched (days); null: from the class and the baseline.</summary>
    public double? MaxPeriodDays { get; init; }
    /// <summary>Number of distinct peaks reported.</summary>
    public int TopPeaks { get; init; } = 5;
    /// <summary>Seed for any bootstrap (stored with the result).</summary>
    public int Seed { get; init; } = 20261201;

    /// <summary>Candidates (distinct GLS peaks) re-evaluated with the multi-harmonic model; at least <see cref="TopPeaks"/>.</summary>
    public int Candidates { get; init; } = 10;
    /// <summary>Harmonics of the ranking model; null: 3 for Cepheids and RRab, 2 for first-overtone pulsators and RRc.</summary>
    public int? RankingHarmonics { get; init; }
    /// <summary>Highest Fourier order the refinement may choose (by BIC, per band).</summary>
    public int MaxRefineHarmonics { get; init; } = 6;
    /// <summary>A search whose best peak has a higher false-alarm probability reports "no_significant_period".</summary>
    public double MaxFalseAlarmProbability { get; init; } = 0.01;
    /// <summary>Bootstrap resamples for the FAP of the best peak (0: analytic only). Each costs one full periodogram.</summary>
    public int BootstrapSamples { get; init; }
    /// <summary>PDM disagrees when another candidate's theta is below (1 - margin) x theta of the chosen period.</summary>
    public double PdmClearMargin { get; init; } = 0.2;
    /// <summary>Also try twice the best period with twice the harmonics (RV Tauri alternating minima); when BIC favours
    /// it, it is appended to the peaks (note "double_period_favoured"). Null: only for Type II Cepheids.</summary>
    public bool? ConsiderDoublePeriod { get; init; }
    /// <summary>Put a BIC-favoured double period first instead of appending it (note "double_period_preferred").</summary>
    public bool PreferDoublePeriod { get; init; }
    /// <summary>Largest grid; a longer one (absurd baseline, e.g. a stray point years away) is coarsened to this size
    /// and the result notes "grid_capped". 500 000 covers 0.01-5 c/d over ten years at n0 = 10.</summary>
    public int MaxFrequencies { get; init; } = 500_000;
    /// <summary>Phase bins of the PDM statistic (one cover).</summary>
    public int PdmBins { get; init; } = 10;
}

/// <summary>One periodogram peak with its significance and its relation to the other peaks.</summary>
/// <param name="Frequency">Refined peak frequency (c/d).</param>
/// <param name="Power">Multiband GLS power at the peak (chi2_0-weighted mean of the per-band powers, 0..1).</param>
/// <param name="Fap">False-alarm probability of a peak this high from noise on this grid, or null.</param>
/// <param name="FapMethod">"baluev2008" (one band), "multiband_beta_naive_neff" (several bands) or "bootstrap".</param>
/// <param name="Aliases">Relations to the peaks listed before this one (docs/period-search.md).</param>
public sealed record PeriodPeak(double Frequency, double Power, double? Fap, string FapMethod, IReadOnlyList<string> Aliases)
{
    public double PeriodDays => 1.0 / Frequency;
    /// <summary>Power 1 - chi2/chi2_ref of the multi-harmonic model with observer offsets (chi2_ref: constants and
    /// offsets only) at <see cref="ModelFrequency"/>; the peaks are ranked by it. Null when no band supports the model.</summary>
    public double? ModelPower { get; init; }
    /// <summary>Frequency where the multi-harmonic model fits best near this peak (c/d).</summary>
    public double? ModelFrequency { get; init; }
}

/// <summary>A curve for plotting: x and y of equal length.</summary>
public sealed record Curve(double[] X, double[] Y);

/// <summary>Output of <see cref="PeriodFinder.FindPeriods"/>.</summary>
public sealed record PeriodSearchResult
{
    /// <summary>Null when a period was found; else a reason code ("too_few_points", "no_significant_period",
    /// "baseline_too_short").</summary>
    public string? FailureReason { get; init; }
    public double MinFrequency { get; init; }
    public double FrequencyStep { get; init; }
    public int FrequencyCount { get; init; }
    public double BaselineDays { get; init; }
    /// <summary>How the power was computed (kernel variant, exact or approximate), for provenance.</summary>
    public string Method { get; init; } = "";
    /// <summary>Distinct peaks, the best first: ranked by the multi-harmonic model power (see <see cref="PeriodPeak.ModelPower"/>).</summary>
    public IReadOnlyList<PeriodPeak> Peaks { get; init; } = [];
    /// <summary>Periodogram thinned for plotting (frequency, power), keeping every local maximum.</summary>
    public Curve Periodogram { get; init; } = new([], []);
    /// <summary>Spectral window of the sampling on the same (thinned) frequencies.</summary>
    public Curve Window { get; init; } = new([], []);

    /// <summary>Highest frequency of the grid (c/d); the FAP refers to [0, MaxFrequency].</summary>
    public double MaxFrequency { get; init; }
    /// <summary>Points that entered the search (finite, positive error, in a band with enough points).</summary>
    public int PointsUsed { get; init; }
    /// <summary>Bands used, and bands left out for having too few points.</summary>
    public IReadOnlyList<string> Bands { get; init; } = [];
    public IReadOnlyList<string> SkippedBands { get; init; } = [];
    /// <summary>Harmonics of the ranking model.</summary>
    public int RankingHarmonics { get; init; }
    /// <summary>Per-band observer zero points (relative to the band's reference observer, which is listed with 0)
    /// fitted with the ranking model at the best peak; errors scaled by max(1, sqrt(chi2_red)).</summary>
    public IReadOnlyList<ObserverOffset> ObserverOffsets { get; init; } = [];
    /// <summary>FAP of the best peak's harmonic model against constants plus observer offsets (method
    /// "model_beta_naive_neff", docs/period-search.md); a search is significant only when this and the periodogram
    /// FAP are both below the threshold. Null when no band supports the model.</summary>
    public double? ModelFap { get; init; }
    /// <summary>Bootstrap FAP of the best peak (fraction of resampled maxima at or above it), when requested.</summary>
    public double? BootstrapFap { get; init; }
    public int BootstrapSamples { get; init; }
    public int Seed { get; init; }
    /// <summary>Remarks for the reviewer ("grid_capped", "offsets_removed_second_pass", ...).</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];
}

/// <summary>PDM statistic at one candidate period.</summary>
public sealed record PdmCandidate(double PeriodDays, double? Theta);

/// <summary>The refined period with its uncertainty and the second opinion.</summary>
public sealed record PeriodEstimate
{
    public double PeriodDays { get; init; }
    public double PeriodErrDays { get; init; }
    public double Frequency { get; init; }
    public double FrequencyErr { get; init; }
    /// <summary>"refined" (nonlinear least squares), or "reviewer" when a person chose it; "unrefined" on failure.</summary>
    public string Method { get; init; } = "";
    /// <summary>Phase dispersion minimisation theta at the chosen period, and the period PDM prefers among the candidates.</summary>
    public double? PdmTheta { get; init; }
    public double? PdmPreferredPeriodDays { get; init; }
    public bool PdmDisagrees { get; init; }

    /// <summary>Null when refined; else why the input frequency is returned as is (error = one peak width, P^2/T).</summary>
    public string? FailureReason { get; init; }
    /// <summary>Fourier order per band chosen by BIC for the refinement.</summary>
    public IReadOnlyList<BandOrder> Orders { get; init; } = [];
    public double Chi2Reduced { get; init; }
    /// <summary>Montgomery &amp; O'Donoghue (1999) frequency error of the most informative band's first harmonic (c/d), for comparison.</summary>
    public double? FrequencyErrMo99 { get; init; }
    /// <summary>Reference epoch of the fit (weighted mean time, BJD_TDB).</summary>
    public double ReferenceEpochBjd { get; init; }
    public IReadOnlyList<ObserverOffset> ObserverOffsets { get; init; } = [];
    public IReadOnlyList<PdmCandidate> PdmCandidates { get; init; } = [];
}

/// <summary>Fourier order used for one band.</summary>
public sealed record BandOrder(string Band, int Harmonics, int Points);

/// <summary>Stage "period search" and "refine period".</summary>
public static class PeriodFinder
{
    /// <summary>Fewer usable points than this: "too_few_points".</summary>
    public const int MinPoints = 12;

    /// <summary>
    /// Multiband period search. Per band, GLS power on the data-driven grid (Periodogram.Gls); bands combined as the
    /// chi2_0-weighted mean (the N_base = 0, N_band = 1 multiband periodogram); the distinct top peaks refined by
    /// Brent; then re-ranked by a multi-harmonic model with per-band, per-observer zero points, which defeats daily
    /// aliases and harmonics of non-sinusoidal curves. Never throws on odd input: returns a reason instead.
    /// </summary>
    public static PeriodSearchResult FindPeriods(IReadOnlyList<LightCurvePoint> points, PulsatorClass classHint, PeriodSearchSettings settings)
        => PeriodSearchEngine.Search(points, classHint, settings ?? new PeriodSearchSettings());

    /// <summary>Refines <paramref name="frequency"/> by nonlinear least squares; PDM compares it with the other candidates.</summary>
    public static PeriodEstimate RefinePeriod(IReadOnlyList<LightCurvePoint> points, double frequency, PeriodSearchResult search, PeriodSearchSettings settings)
        => PeriodSearchEngine.Refine(points, frequency, search, settings ?? new PeriodSearchSettings());
}
