namespace PulseLadder.Demo;

/// <summary>
/// A periodic light curve in magnitudes: m(phi) = A0 + a [sin(2 pi phi) + R21 sin(4 pi phi + phi21) + R31 sin(6 pi phi + phi31)]
/// (sine-series Fourier parameters in the Simon and Lee 1981 sense, first-harmonic phase 0 at the star's T0).
/// Scaled so the peak-to-peak amplitude and the intensity mean are exactly the requested ones.
/// </summary>
internal sealed class DemoLightCurve
{
    // The shape is a trigonometric polynomial of degree 3, so an equispaced mean over 1024 points is exact for the
    // magnitude mean and converges geometrically for the intensity mean (far below 1e-6 mag here).
    private const int Grid = 1024;

    private readonly double _r21, _r31, _phi21, _phi31;
    private readonly double[] _grid = new double[Grid];
    private readonly double _peakToPeak;

    public DemoLightCurve(double r21, double r31, double phi21, double phi31)
    {
        _r21 = r21;
        _r31 = r31;
        _phi21 = phi21;
        _phi31 = phi31;
        double min = double.MaxValue, max = double.MinValue;
        int iMin = 0;
        for (int i = 0; i < Grid; i++)
        {
            double s = _grid[i] = Shape((double)i / Grid);
            if (s < min) { min = s; iMin = i; }
            if (s > max) max = s;
        }
        // Parabolic refinement of the minimum (maximum light) between grid points.
        double a = _grid[(iMin + Grid - 1) % Grid], b = _grid[iMin], c = _grid[(iMin + 1) % Grid];
        double denom = a - 2 * b + c;
        double delta = denom > 0 ? 0.5 * (a - c) / denom : 0;
        double phase = (iMin + delta) / Grid;
        PhaseOfMaximumLight = phase - Math.Floor(phase);
        _peakToPeak = max - Math.Min(min, Shape(PhaseOfMaximumLight));
    }

    /// <summary>Phase (0..1) where the magnitude is smallest (maximum light).</summary>
    public double PhaseOfMaximumLight { get; }

    /// <summary>Unit-first-harmonic shape at phase <paramref name="phase"/>.</summary>
    public double Shape(double phase)
    {
        double x = 2 * Math.PI * phase;
        return Math.Sin(x) + _r21 * Math.Sin(2 * x + _phi21) + _r31 * Math.Sin(3 * x + _phi31);
    }

    /// <summary>A0 and scale so that the curve has peak-to-peak <paramref name="amplitude"/> and intensity mean <paramref name="intensityMean"/>.</summary>
    public (double A0, double Scale) Calibrate(double amplitude, double intensityMean)
    {
        double scale = amplitude / _peakToPeak;
        double k = -0.4 * Math.Log(10) * scale;
        double sum = 0;
        foreach (double s in _grid) sum += Math.Exp(k * s);
        // <m>_int = A0 - 2.5 log10 <10^(-0.4 a S)>, solved for A0.
        return (intensityMean + 2.5 * Math.Log10(sum / Grid), scale);
    }
}
