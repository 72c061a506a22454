using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Calibration;

/// <summary>
/// Conversion of first-overtone periods to the equivalent fundamental-mode period (SCIENCE 3.4):
/// classical Cepheids P1/P0 = 0.720 - 0.027 log P0 (LMC double-mode Cepheids, Alcock et al. 1995, AJ 109, 1653),
/// solved by fixed-point iteration; RRc log P0 = log P1 + 0.127. Periods in days.
/// </summary>
public static class Fundamentalisation
{
    public const string CepheidMethod = "alcock1995_p1p0";
    public const string RRcMethod = "rrc_logp_plus_0.127";

    /// <summary>Fundamental period for an overtone pulsator, or the input for fundamental-mode classes.</summary>
    public static double FundamentalPeriod(PulsatorClass cls, double periodDays, out string? method)
    {
        switch (cls)
        {
            case PulsatorClass.ClassicalCepheidFirstOvertone:
                method = CepheidMethod;
                return CepheidP0(periodDays);
            case PulsatorClass.RRLyraeC:
                method = RRcMethod;
                return periodDays * Math.Pow(10.0, 0.127);
            default:
                method = null;
                return periodDays;
        }
    }

    /// <summary>P0 from P1 for classical Cepheids; the map is a strong contraction (|d/dP0| ~ 0.03), so 30 steps reach 1e-15.</summary>
    public static double CepheidP0(double p1)
    {
        double p0 = p1 / 0.716;
        for (int i = 0; i < 30; i++)
        {
            double next = p1 / (0.720 - 0.027 * Math.Log10(p0));
            if (Math.Abs(next - p0) <= 1e-14 * p0) return next;
            p0 = next;
        }
        return p0;
    }
}
