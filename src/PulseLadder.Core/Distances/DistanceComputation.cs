using System.Runtime.Intrinsics;
using MathNet.Numerics.Distributions;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Extinction;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Distances;

/// <summary>The work behind <see cref="DistanceEstimator.EstimateDistance(StarInfo, PulsatorClass, double, double, IReadOnlyList{BandFit}, DistanceSettings, CalibrationRegistry)"/>.</summary>
internal static class DistanceComputation
{
    /// <summary>A route prepared for evaluation: which star bands enter with which coefficient.</summary>
    private sealed class RouteModel
    {
        public required PlRelation Relation { get; init; }
        public required int[] BandIndex { get; init; }     // into the star's band arrays
        public required double[] Coef { get; init; }       // magnitude combination: m = sum coef_k mag_k
        public required bool NeedsExtinction { get; init; }
        public required double AnchorMu { get; init; }      // subtracted relation magnitude offset for apparent relations
        public required double AnchorErr { get; init; }
        /// <summary>Factor from the observed period to the period the relation takes (fundamentalisation or 1).</summary>
        public required double PScale { get; init; }
        /// <summary>Z - [Fe/H] (0 for the [Fe/H] scale; the Salaris offset for log Z), so Z = [Fe/H] + ZShift.</summary>
        public required double ZShift { get; init; }
        public required List<string> Flags { get; init; }
    }

    public static DistanceResult Run(StarInfo star, PulsatorClass cls, double periodDays, double periodErrDays, IReadOnlyList<BandFit> fits, DistanceSettings s, CalibrationRegistry registry)
    {
        var flags = new List<string>();
        switch (cls)
        {
            case PulsatorClass.Unknown: return Fail("unclassified", flags);
            case PulsatorClass.NotVariable: return Fail("not_variable", flags);
            case PulsatorClass.OtherVariable: return Fail("no_relation_for_class", flags);
        }
        if (!registry.Relations.Any(r => r.Classes.Contains(cls))) return Fail("no_relation_for_class", flags);
        if (!(periodDays > 0) || !double.IsFinite(periodDays)) return Fail("no_period", flags);
        double sigmaP = double.IsFinite(periodErrDays) && periodErrDays > 0 ? periodErrDays : 0.0;

        // Star photometry: first usable fit per band.
        var bandNames = new List<string>();
        var mags = new List<double>();
        var errs = new List<double>();
        foreach (var f in fits)
        {
            if (string.IsNullOrEmpty(f.Band) || bandNames.Contains(f.Band)) continue;
            if (!double.IsFinite(f.IntensityMeanMag) || !BandWavelengths.TryGet(f.Band, out _)) continue;
            bandNames.Add(f.Band);
            mags.Add(f.IntensityMeanMag);
            errs.Add(double.IsFinite(f.IntensityMeanErr) && f.IntensityMeanErr > 0 ? f.IntensityMeanErr : 0.0);
        }
        if (s.DeriveMissingBands)
        {
            foreach (var t in registry.BandTransforms)
            {
                if (bandNames.Contains(t.Target)) continue;
                int im = bandNames.IndexOf(t.Mag), i1 = bandNames.IndexOf(t.Color1), i2 = bandNames.IndexOf(t.Color2);
                if (im < 0 || i1 < 0 || i2 < 0) continue;
                // Error of mag + c1 (c1band - c2band) with the bands' errors combined by coefficient, plus the transform's scatter.
                var coef = new Dictionary<int, double> { [im] = 1.0 };
                coef[i1] = coef.GetValueOrDefault(i1) + t.C1;
                coef[i2] = coef.GetValueOrDefault(i2) - t.C1;
                double value = t.C0, var2 = t.Scatter * t.Scatter;
                foreach (var (i, c) in coef) { value += c * mags[i]; var2 += c * c * errs[i] * errs[i]; }
                bandNames.Add(t.Target);
                mags.Add(value);
                errs.Add(Math.Sqrt(var2));
                flags.Add("band_derived:" + t.Id);
            }
        }
        if (bandNames.Count == 0) return Fail("no_usable_band", flags);

        // Period actually used by fundamental-mode relations.
        double pF = Fundamentalisation.FundamentalPeriod(cls, periodDays, out var fundMethod);
        double pScale = pF / periodDays;

        // Which relation: requested id, else registry default.
        string? requested = cls switch
        {
            PulsatorClass.ClassicalCepheidFundamental or PulsatorClass.ClassicalCepheidFirstOvertone => s.CepheidRelationId,
            PulsatorClass.TypeIICepheid => s.TypeIICepheidRelationId,
            _ => s.RRLyraeRelationId,
        };
        PlRelation? chosen = null;
        if (!string.IsNullOrWhiteSpace(requested))
        {
            if (!registry.TryGet(requested, out var req)) return Fail("unknown_relation", [.. flags, "unknown_relation:" + requested]);
            if (!req.Classes.Contains(cls)) flags.Add("relation_not_for_class:" + requested);
            else chosen = req;
        }
        var usable = registry.Usable(cls, bandNames).ToList();
        if (usable.Count == 0) return Fail("no_usable_band", flags);
        string family;
        if (chosen is not null) family = chosen.Family;
        else
        {
            var defId = registry.Default(cls, bandNames)!;
            registry.TryGet(defId, out var def);
            family = def.Family;
        }
        var candidates = s.RoutesAcrossFamilies ? usable : usable.Where(r => r.Family == family).ToList();
        if (chosen is not null && !candidates.Contains(chosen)) flags.Add("requested_relation_unusable:" + chosen.Id);

        // Reddening.
        var (ebv, ebvErr, ebvSource, ebvFlags) = ChooseEbv(star, cls, pF, bandNames, mags, errs, s, registry);
        flags.AddRange(ebvFlags);

        // Metallicity.
        double? feh = star.FeH is { } z && double.IsFinite(z) ? z : null;

        var models = new List<RouteModel>();
        foreach (var rel in candidates)
        {
            var m = Prepare(rel, bandNames, registry, rel.NeedsFundamentalPeriod ? pScale : 1.0, periodDays);
            if (m.NeedsExtinction && ebv is null) continue;
            models.Add(m);
        }
        if (models.Count == 0)
            return Fail(candidates.Any(r => !r.IsWesenheit) ? "no_reddening" : "no_usable_band", flags);

        // Report: requested relation when computable, else by preference.
        var reported = chosen is not null ? models.FirstOrDefault(m => m.Relation.Id == chosen.Id) : null;
        if (reported is null)
        {
            reported = models.OrderBy(m => Rank(m.Relation, s.RoutePreference)).First();
            if (chosen is not null && !flags.Contains("requested_relation_unusable:" + chosen.Id)) flags.Add("requested_relation_unusable:" + chosen.Id);
        }

        int seed = MixSeed(s.Seed, star.Name);
        var ctx = new Inputs
        {
            Mags = mags.ToArray(), Errs = errs.ToArray(), PeriodDays = periodDays, SigmaP = sigmaP,
            Ebv = ebv ?? 0, EbvErr = Math.Max(0, ebvErr ?? 0), Rv = s.Rv, RvErr = Math.Max(0, s.RvErr), Law = s.ExtinctionLaw,
            Bands = bandNames.ToArray(),
        };
        var routes = EvaluateRoutes(models, ctx, feh, s, seed);

        int ri = models.IndexOf(reported);
        routes[ri] = routes[ri] with { Reported = true };
        var rep = routes[ri];
        var repRel = reported.Relation;
        if (fundMethod is not null && reported.PScale != 1.0) flags.Add("period_fundamentalised:" + fundMethod);
        if (feh is null) flags.Add("feh_assumed");
        // Route flags move up to the star, except the provenance caveat, which every embedded "M" relation carries
        // (it stays on the routes and in Relation.Tag rather than flooding every star's review flags).
        foreach (var f in rep.Flags) if (f != "relation_from_memory" && !flags.Contains(f)) flags.Add(f);

        double? anchorMu = repRel.Kind == RelationKind.Apparent ? reported.AnchorMu : null;
        return new DistanceResult
        {
            RelationId = repRel.Id,
            Band = repRel.BandLabel,
            Ebv = ebv,
            EbvErr = ebv is null ? null : ebvErr,
            EbvSource = ebvSource,
            Mu = rep.Mu, MuErr = rep.MuErr, MuErrStat = rep.MuErrStat, MuErrSys = rep.MuErrSys,
            MuErrMeasurement = rep.Budget.Measurement,
            Mu16 = rep.Mu16, Mu84 = rep.Mu84,
            DistancePc = rep.DistancePc,
            DistancePcErr = 0.5 * (rep.DistancePc84 - rep.DistancePc16),
            DistancePc16 = rep.DistancePc16, DistancePc84 = rep.DistancePc84,
            PeriodUsedDays = periodDays * reported.PScale, LogPUsed = Math.Log10(periodDays * reported.PScale),
            Fundamentalisation = reported.PScale != 1.0 ? fundMethod : null,
            FeH = feh ?? repRel.FeHDefault,
            FeHSource = feh is null ? "relation_default" : "star_list",
            Rv = s.Rv, ExtinctionLaw = s.ExtinctionLaw.ToCode(),
            ApparentMag0 = rep.ApparentMag - rep.Extinction,
            MetallicityTerm = rep.MetallicityTerm,
            RvSensitivity = rep.RvSensitivity,
            AnchorId = repRel.AnchorId, AnchorMu = anchorMu,
            Relation = repRel,
            Draws = s.MonteCarloDraws, Seed = seed,
            Routes = routes,
            Flags = flags,
        };
    }

    private static DistanceResult Fail(string reason, List<string> flags) => new() { FailureReason = reason, Flags = flags };

    private static int Rank(PlRelation r, RoutePreference pref)
    {
        // Lower is better. Bands ordered by falling extinction sensitivity.
        int bandRank = (r.IsWesenheit ? "W" : r.Mag) switch
        {
            "W" => 0, "Ks" or "K" => 1, "H" => 2, "J" => 3, "z" => 4, "I" => 5, "i" => 6, "R" => 7, "r" => 8,
            "V" => 9, "g" => 10, "B" => 11, "U" => 12, "u" => 13, _ => 14,
        };
        if (pref == RoutePreference.ReddeningCorrectedFirst && r.IsWesenheit) bandRank = 20;
        return bandRank;
    }

    /// <summary>FNV-1a of the star name mixed into the seed, so that stars of one field draw independent noise.</summary>
    internal static int MixSeed(int seed, string name)
    {
        uint h = 2166136261;
        foreach (char c in name) { h ^= c; h *= 16777619; }
        return (int)((uint)seed ^ h) & int.MaxValue;
    }

    private static RouteModel Prepare(PlRelation rel, List<string> bands, CalibrationRegistry registry, double pScale, double periodDays)
    {
        var flags = new List<string>();
        var idx = new List<int>();
        var coef = new List<double>();
        void Add(string relBand, double c)
        {
            var sb = BandMatch.Find(relBand, bands)!;
            if (sb != relBand) { var f = $"band_substituted:{sb}->{relBand}"; if (!flags.Contains(f)) flags.Add(f); }
            int i = bands.IndexOf(sb);
            int at = idx.IndexOf(i);
            if (at >= 0) coef[at] += c;
            else { idx.Add(i); coef.Add(c); }
        }
        Add(rel.Mag, 1.0);
        if (rel.IsWesenheit)
        {
            Add(rel.Color1!, -rel.WesenheitR);
            Add(rel.Color2!, rel.WesenheitR);
        }
        double logP = Math.Log10(periodDays * pScale);
        if (!rel.InPeriodRange(logP)) flags.Add("period_extrapolated");
        if (rel.Tag == "M") flags.Add("relation_from_memory");
        double anchorMu = 0, anchorErr = 0;
        if (rel.Kind == RelationKind.Apparent && registry.TryGetAnchor(rel.AnchorId, out var anchor))
        {
            anchorMu = anchor.Mu ?? 0;
            anchorErr = anchor.MuErr;
        }
        return new RouteModel
        {
            Relation = rel, BandIndex = idx.ToArray(), Coef = coef.ToArray(), NeedsExtinction = !rel.IsWesenheit,
            AnchorMu = anchorMu, AnchorErr = anchorErr, PScale = pScale, ZShift = rel.MetallicityVariable(0.0), Flags = flags,
        };
    }

    private static (double? Ebv, double? Err, string Source, List<string> Flags) ChooseEbv(StarInfo star, PulsatorClass cls, double pF, List<string> bands, List<double> mags, List<double> errs, DistanceSettings s, CalibrationRegistry registry)
    {
        var flags = new List<string>();
        if (star.Ebv is { } e && double.IsFinite(e))
        {
            double err = star.EbvErr is { } ee && double.IsFinite(ee) && ee >= 0 ? ee : s.StarEbvErrIfMissing;
            if (star.EbvErr is null) flags.Add("ebv_error_assumed");
            if (e < 0) { flags.Add("ebv_negative_clamped"); e = 0; }
            return (e, err, "star_list", flags);
        }
        if (s.DefaultEbv is { } d && double.IsFinite(d))
        {
            return (Math.Max(0, d), s.DefaultEbvErr is { } de && double.IsFinite(de) && de >= 0 ? de : s.StarEbvErrIfMissing, "field_default", flags);
        }
        if (s.EstimateEbvFromColour)
        {
            double logP = Math.Log10(pF);
            foreach (var pc in registry.PeriodColourRelations)
            {
                if (!pc.Classes.Contains(cls)) continue;
                int i1 = bands.IndexOf(pc.Color1), i2 = bands.IndexOf(pc.Color2);
                if (i1 < 0 || i2 < 0) continue;
                double excess = mags[i1] - mags[i2] - pc.IntrinsicColour(logP);
                // E(c1-c2) -> E(B-V) with the chosen law: E(c1-c2)/E(B-V) = R_V (k1 - k2).
                double k1 = BandWavelengths.AOverAv(pc.Color1, s.ExtinctionLaw, s.Rv), k2 = BandWavelengths.AOverAv(pc.Color2, s.ExtinctionLaw, s.Rv);
                double ratio = s.Rv * (k1 - k2);
                double ebv = excess / ratio;
                double err = Math.Sqrt(pc.Scatter * pc.Scatter + errs[i1] * errs[i1] + errs[i2] * errs[i2]) / ratio;
                flags.Add("ebv_from_period_colour");
                if (!(logP >= pc.LogPMin && logP <= pc.LogPMax)) flags.Add("period_colour_extrapolated");
                if (ebv < 0) { flags.Add("ebv_negative_clamped"); ebv = 0; }
                return (ebv, err, "period_colour:" + pc.Id, flags);
            }
        }
        return (null, null, "none", flags);
    }

    private sealed class Inputs
    {
        public required double[] Mags, Errs;
        public required string[] Bands;
        public required double PeriodDays, SigmaP, Ebv, EbvErr, Rv, RvErr;
        public required ExtinctionLaw Law;
    }

    private static List<DistanceRoute> EvaluateRoutes(List<RouteModel> models, Inputs x, double? feh, DistanceSettings s, int seed)
    {
        int nb = x.Mags.Length, nr = models.Count, n = s.MonteCarloDraws;

        // Nominal extinction coefficients k = A/A_V per band, and numerical dk/dRv.
        var k = new double[nb];
        var dk = new double[nb];
        var laws = new FixedWavelengthLaw[nb];
        for (int b = 0; b < nb; b++)
        {
            BandWavelengths.TryGet(x.Bands[b], out var lam);
            laws[b] = new FixedWavelengthLaw(x.Law, lam);
            k[b] = laws[b].AOverAv(x.Rv);
            const double h = 0.01;
            dk[b] = ((x.Rv + h) * laws[b].AOverAv(x.Rv + h) - (x.Rv - h) * laws[b].AOverAv(x.Rv - h)) / (2 * h); // d(A/E(B-V))/dRv
        }

        var result = new List<DistanceRoute>(nr);
        var nominal = new double[nr];
        var budgets = new ErrorBudget[nr];
        var fehVal = new double[nr];
        var fehErr = new double[nr];
        var logPn = new double[nr];
        for (int r = 0; r < nr; r++)
        {
            var m = models[r];
            var rel = m.Relation;
            logPn[r] = Math.Log10(x.PeriodDays * m.PScale);
            fehVal[r] = feh ?? rel.FeHDefault;
            fehErr[r] = feh is null ? rel.FeHDefaultErr : Math.Max(0, s.FeHErr);
            nominal[r] = Mu(m, x.Mags, logPn[r], x.Ebv, x.Rv, k, fehVal[r], rel.A, rel.B, rel.Gamma, m.AnchorMu, 0.0);
            budgets[r] = Budget(m, x, k, dk, logPn[r], fehVal[r], fehErr[r]);
        }

        var tot = new double[nr][];
        var stat = new double[nr][];
        var sys = new double[nr][];
        if (n > 0)
        {
            for (int r = 0; r < nr; r++) { tot[r] = new double[n]; stat[r] = new double[n]; sys[r] = new double[n]; }
            var rng = new Random(seed);
            var g = new Gauss(rng);
            var md = new double[nb];
            var kd = new double[nb];
            bool anyExt = models.Any(m => m.NeedsExtinction);
            bool anyFehErr = fehErr.Any(e => e > 0);
            double ebvLow = x.EbvErr > 0 ? Normal.CDF(0, 1, -x.Ebv / x.EbvErr) : 0;
            for (int j = 0; j < n; j++)
            {
                // Fixed draw order (reproducibility): mags, period, E(B-V), R_V, [Fe/H], then per route a, b, gamma, scatter, anchor.
                for (int b = 0; b < nb; b++) md[b] = x.Errs[b] > 0 ? x.Mags[b] + x.Errs[b] * g.Next() : x.Mags[b];
                double pd = x.SigmaP > 0 ? x.PeriodDays + x.SigmaP * g.Next() : x.PeriodDays;
                double lpd = pd > 0 ? Math.Log10(pd) - Math.Log10(x.PeriodDays) : 0.0; // log P offset of this draw
                double ed = x.Ebv;
                if (x.EbvErr > 0)
                {
                    // Normal truncated at E(B-V) = 0: rejection while it is cheap (acceptance >= 1/2), else inverse CDF.
                    if (ebvLow < 0.5)
                    {
                        do ed = x.Ebv + x.EbvErr * g.Next(); while (ed < 0);
                    }
                    else
                    {
                        double u = Math.Clamp(ebvLow + (1 - ebvLow) * g.NextUniform(), 1e-15, 1 - 1e-15);
                        ed = Math.Max(0, x.Ebv + x.EbvErr * Normal.InvCDF(0, 1, u));
                    }
                }
                double rvd = x.RvErr > 0 ? Math.Max(1.0, x.Rv + x.RvErr * g.Next()) : x.Rv;
                if (anyExt && x.RvErr > 0)
                    for (int b = 0; b < nb; b++) kd[b] = laws[b].AOverAv(rvd);
                else
                    Array.Copy(k, kd, nb);
                double zFeh = anyFehErr ? g.Next() : 0.0;
                for (int r = 0; r < nr; r++)
                {
                    var m = models[r];
                    var rel = m.Relation;
                    // Zero-width terms draw nothing (the draw sequence is still fixed by the relation set).
                    double ad = rel.AErr > 0 ? rel.A + rel.AErr * g.Next() : rel.A;
                    double bd = rel.BErr > 0 ? rel.B + rel.BErr * g.Next() : rel.B;
                    double gd = rel.GammaErr > 0 ? rel.Gamma + rel.GammaErr * g.Next() : rel.Gamma;
                    double sc = rel.Scatter > 0 ? rel.Scatter * g.Next() : 0.0;
                    double an = m.AnchorErr > 0 ? m.AnchorMu + m.AnchorErr * g.Next() : m.AnchorMu;
                    double fd = fehVal[r] + fehErr[r] * zFeh;
                    double logPd = logPn[r] + lpd;
                    tot[r][j] = Mu(m, md, logPd, ed, rvd, kd, fd, ad, bd, gd, an, sc);
                    stat[r][j] = Mu(m, md, logPd, ed, x.Rv, k, fd, rel.A, rel.B, rel.Gamma, m.AnchorMu, sc);
                    sys[r][j] = Mu(m, x.Mags, logPn[r], x.Ebv, rvd, kd, fehVal[r], ad, bd, gd, an, 0.0);
                }
            }
        }

        for (int r = 0; r < nr; r++)
        {
            var m = models[r];
            var rel = m.Relation;
            double app = 0;
            for (int i = 0; i < m.BandIndex.Length; i++) app += m.Coef[i] * x.Mags[m.BandIndex[i]];
            double ext = m.NeedsExtinction ? ExtinctionOf(m, x.Ebv, x.Rv, k) : 0.0;
            double metTerm = rel.Gamma * (rel.MetallicityVariable(fehVal[r]) - rel.ZRef);
            double absMag = rel.A + rel.B * (logPn[r] - rel.P0) + metTerm - (rel.Kind == RelationKind.Apparent ? m.AnchorMu : 0.0);
            double? resid = null;
            if (rel.IsWesenheit)
            {
                double a = 0;
                for (int i = 0; i < m.BandIndex.Length; i++) a += m.Coef[i] * k[m.BandIndex[i]] * x.Rv;
                resid = a;
            }
            double rvSens = 0;
            if (m.NeedsExtinction)
            {
                double dA = 0;
                for (int i = 0; i < m.BandIndex.Length; i++) dA += m.Coef[i] * dk[m.BandIndex[i]];
                rvSens = -dA * x.Ebv * x.RvErr;
            }
            double mu, muErr, muStat, muSys, p16, p84;
            if (n > 0)
            {
                (p16, mu, p84) = Percentiles(tot[r]);
                muErr = 0.5 * (p84 - p16);
                var (s16, s84) = OneSigmaPercentiles(stat[r]);
                var (y16, y84) = OneSigmaPercentiles(sys[r]);
                muStat = 0.5 * (s84 - s16);
                muSys = 0.5 * (y84 - y16);
            }
            else
            {
                mu = nominal[r];
                muErr = budgets[r].Total; muStat = budgets[r].Statistical; muSys = budgets[r].Systematic;
                p16 = mu - muErr; p84 = mu + muErr;
            }
            result.Add(new DistanceRoute
            {
                RelationId = rel.Id,
                Band = rel.BandLabel,
                AbsoluteMag = absMag,
                ApparentMag = app,
                Extinction = ext,
                WesenheitResidualPerEbv = resid,
                Mu = mu, MuErr = muErr, MuErrStat = muStat, MuErrSys = muSys, Mu16 = p16, Mu84 = p84,
                MuNominal = nominal[r],
                DistancePc = Pc(mu), DistancePc16 = Pc(p16), DistancePc84 = Pc(p84),
                Budget = budgets[r],
                MetallicityTerm = metTerm,
                RvSensitivity = rvSens,
                Flags = m.Flags,
            });
        }
        return result;
    }

    private static double Pc(double mu) => Math.Pow(10.0, mu / 5.0 + 1.0);

    private static double ExtinctionOf(RouteModel m, double ebv, double rv, double[] k)
    {
        double a = 0;
        for (int i = 0; i < m.BandIndex.Length; i++) a += m.Coef[i] * k[m.BandIndex[i]];
        return a * rv * ebv;
    }

    /// <summary>mu = m - A - M, with M the relation magnitude (minus the anchor modulus for apparent relations) plus scatter.</summary>
    private static double Mu(RouteModel m, double[] mags, double logP, double ebv, double rv, double[] k, double feh, double a, double b, double gamma, double anchorMu, double scatter)
    {
        var rel = m.Relation;
        double app = 0, ak = 0;
        var bi = m.BandIndex;
        var c = m.Coef;
        for (int i = 0; i < bi.Length; i++)
        {
            app += c[i] * mags[bi[i]];
            ak += c[i] * k[bi[i]];
        }
        double ext = m.NeedsExtinction ? ak * rv * ebv : 0.0;
        double z = feh + m.ZShift;
        double mRel = a + b * (logP - rel.P0) + gamma * (z - rel.ZRef) + scatter;
        if (rel.Kind == RelationKind.Apparent) mRel -= anchorMu;
        return app - ext - mRel;
    }

    private static ErrorBudget Budget(RouteModel m, Inputs x, double[] k, double[] dk, double logP, double feh, double fehErr)
    {
        var rel = m.Relation;
        double phot2 = 0, ak = 0, dak = 0;
        for (int i = 0; i < m.BandIndex.Length; i++)
        {
            int b = m.BandIndex[i];
            phot2 += m.Coef[i] * m.Coef[i] * x.Errs[b] * x.Errs[b];
            ak += m.Coef[i] * k[b];
            dak += m.Coef[i] * dk[b];
        }
        double sigLogP = x.SigmaP / (x.PeriodDays * Math.Log(10.0));
        double period = Math.Abs(rel.B) * sigLogP;
        double red = m.NeedsExtinction ? Math.Abs(ak * x.Rv) * x.EbvErr : 0;
        double rv = m.NeedsExtinction ? Math.Abs(dak * x.Ebv) * x.RvErr : 0;
        double met = Math.Abs(rel.Gamma) * fehErr;
        double zOff = rel.MetallicityVariable(feh) - rel.ZRef;
        double gam = Math.Abs(zOff) * rel.GammaErr;
        double slope = Math.Abs(logP - rel.P0) * rel.BErr;
        double anchor = m.AnchorErr;
        double meas = Math.Sqrt(phot2 + period * period + red * red + met * met);
        double statv = Math.Sqrt(meas * meas + rel.Scatter * rel.Scatter);
        double sysv = Math.Sqrt(rel.AErr * rel.AErr + slope * slope + gam * gam + anchor * anchor + rv * rv);
        return new ErrorBudget
        {
            Photometry = Math.Sqrt(phot2), Period = period, Reddening = red, Metallicity = met, Scatter = rel.Scatter,
            ZeroPoint = rel.AErr, Slope = slope, Gamma = gam, Anchor = anchor, Rv = rv,
            Measurement = meas, Statistical = statv, Systematic = sysv, Total = Math.Sqrt(statv * statv + sysv * sysv),
        };
    }

    /// <summary>
    /// 15.87th, 50th and 84.13th percentiles (linear interpolation between order statistics, as numpy's default).
    /// Reorders <paramref name="v"/>. Selection instead of a full sort (this runs several times per star); each later
    /// selection works only inside the partition the earlier one left.
    /// </summary>
    internal static (double P16, double P50, double P84) Percentiles(double[] v)
    {
        int n = v.Length;
        var (m, lo50) = QuantileIn(v, 0.5, 0, n - 1);
        var (a, _) = QuantileIn(v, P16, 0, lo50);
        var (b, _) = QuantileIn(v, P84, lo50, n - 1);
        return (a, m, b);
    }

    /// <summary>The 15.87th and 84.13th percentiles only (see <see cref="Percentiles"/>).</summary>
    internal static (double P16, double P84) OneSigmaPercentiles(double[] v)
    {
        int n = v.Length;
        var (a, lo16) = QuantileIn(v, P16, 0, n - 1);
        var (b, _) = QuantileIn(v, P84, lo16, n - 1);
        return (a, b);
    }

    /// <summary>Normal-distribution 1-sigma quantiles Phi(-1), Phi(+1).</summary>
    private const double P16 = 0.15865525393145707, P84 = 0.8413447460685429;

    /// <summary>
    /// Quantile q of the whole array, given that its two order statistics lie in [left, right] and that [left, right]
    /// is already partitioned from the rest (everything left of it is smaller, right of it larger).
    /// Returns the value and the lower order-statistic index.
    /// </summary>
    private static (double Value, int Lo) QuantileIn(double[] v, double q, int left, int right)
    {
        double h = (v.Length - 1) * q;
        int lo = (int)Math.Floor(h);
        double a = Select(v, lo, left, right);
        if (lo + 1 >= v.Length || h == lo) return (a, lo);
        // After Select every element right of lo (within the range) is >= v[lo]; the next order statistic is their minimum.
        double b = double.PositiveInfinity;
        // If lo is the range's last index, the neighbour lies beyond it (all larger): scan that part instead.
        int end = lo < right ? right : v.Length - 1;
        for (int i = lo + 1; i <= end; i++) if (v[i] < b) b = v[i];
        return (a + (h - lo) * (b - a), lo);
    }

    internal static double Quantile(double[] v, double q) => QuantileIn(v, q, 0, v.Length - 1).Value;

    /// <summary>k-th smallest element (0-based) by iterative Hoare quickselect with median-of-three pivots, within [left, right].</summary>
    private static double Select(double[] v, int k, int left, int right)
    {
        while (right > left)
        {
            int mid = left + ((right - left) >> 1);
            if (v[mid] < v[left]) (v[mid], v[left]) = (v[left], v[mid]);
            if (v[right] < v[left]) (v[right], v[left]) = (v[left], v[right]);
            if (v[right] < v[mid]) (v[right], v[mid]) = (v[mid], v[right]);
            double pivot = v[mid];
            int i = left, j = right;
            while (i <= j)
            {
                while (v[i] < pivot) i++;
                while (v[j] > pivot) j--;
                if (i <= j) { (v[i], v[j]) = (v[j], v[i]); i++; j--; }
            }
            if (k <= j) right = j;
            else if (k >= i) left = i;
            else return v[k];
        }
        return v[k];
    }

    /// <summary>
    /// Standard normal deviates by inversion: one uniform from System.Random per deviate through Acklam's rational
    /// approximation of the normal quantile (relative error below 1.2e-9; checked against Math.NET's InvCDF in the
    /// tests). Cheaper than the polar method (no rejection, no pairs), which matters in the per-star loop.
    /// </summary>
    internal sealed class Gauss(Random rng)
    {
        // Uniforms are drawn from rng in blocks, in order, and every one is also turned into a deviate up front (the
        // central region four at a time): the k-th value consumed, as a uniform or as a deviate, is the k-th the
        // generator gave, so the sequence is the one drawing them one by one would give, bit for bit.
        private const int Block = 64;
        private readonly double[] _u = new double[Block], _z = new double[Block];
        private int _next = Block;

        /// <summary>Next standard normal deviate (a zero uniform is skipped, as the inversion needs 0 &lt; p &lt; 1).</summary>
        public double Next()
        {
            while (true)
            {
                if (_next == Block) Refill();
                int k = _next++;
                if (_u[k] != 0.0) return _z[k];
            }
        }

        /// <summary>Next uniform of the same stream, in [0, 1).</summary>
        public double NextUniform()
        {
            if (_next == Block) Refill();
            return _u[_next++];
        }

        private void Refill()
        {
            for (int i = 0; i < Block; i++) _u[i] = rng.NextDouble();
            InverseNormalBlock(_u, _z);
            _next = 0;
        }

        /// <summary><see cref="InverseNormal"/> of each element: the central branch in vectors with the scalar
        /// operations (multiply, add and divide, no fused steps), so the same bits; tails and zeros one by one.</summary>
        internal static void InverseNormalBlock(ReadOnlySpan<double> p, Span<double> z)
        {
            int i = 0;
            if (Vector256.IsHardwareAccelerated)
            {
                var lo = Vector256.Create(PLow);
                var hi = Vector256.Create(1 - PLow);
                var half = Vector256.Create(0.5);
                for (; i + 4 <= p.Length; i += 4)
                {
                    var pv = Vector256.Create(p.Slice(i, 4));
                    var c = pv - half;
                    var r = c * c;
                    var num = ((((C(-3.969683028665376e+01) * r + C(2.209460984245205e+02)) * r - C(2.759285104469687e+02)) * r + C(1.383577518672690e+02)) * r - C(3.066479806614716e+01)) * r + C(2.506628277459239e+00);
                    var den = ((((C(-5.447609879822406e+01) * r + C(1.615858368580409e+02)) * r - C(1.556989798598866e+02)) * r + C(6.680131188771972e+01)) * r - C(1.328068155288572e+01)) * r + C(1.0);
                    (num * c / den).CopyTo(z.Slice(i, 4));
                    // Lanes outside the central region (p < PLow, p > 1 - PLow, NaN): scalar.
                    var central = Vector256.GreaterThanOrEqual(pv, lo) & Vector256.LessThanOrEqual(pv, hi);
                    if (central.ExtractMostSignificantBits() != 0b1111)
                        for (int j = i; j < i + 4; j++)
                            if (!(p[j] >= PLow && p[j] <= 1 - PLow)) z[j] = InverseNormal(p[j]);
                }
            }
            for (; i < p.Length; i++) z[i] = InverseNormal(p[i]);
        }

        private static Vector256<double> C(double v) => Vector256.Create(v);

        private const double PLow = 0.02425;

        internal static double InverseNormal(double p)
        {
            if (p < PLow)
            {
                double q = Math.Sqrt(-2 * Math.Log(p));
                return (((((-7.784894002430293e-03 * q - 3.223964580411365e-01) * q - 2.400758277161838e+00) * q - 2.549732539343734e+00) * q + 4.374664141464968e+00) * q + 2.938163982698783e+00)
                    / ((((7.784695709041462e-03 * q + 3.224671290700398e-01) * q + 2.445134137142996e+00) * q + 3.754408661907416e+00) * q + 1);
            }
            if (p > 1 - PLow)
            {
                double q = Math.Sqrt(-2 * Math.Log(1 - p));
                return -(((((-7.784894002430293e-03 * q - 3.223964580411365e-01) * q - 2.400758277161838e+00) * q - 2.549732539343734e+00) * q + 4.374664141464968e+00) * q + 2.938163982698783e+00)
                    / ((((7.784695709041462e-03 * q + 3.224671290700398e-01) * q + 2.445134137142996e+00) * q + 3.754408661907416e+00) * q + 1);
            }
            double c = p - 0.5, r = c * c;
            return (((((-3.969683028665376e+01 * r + 2.209460984245205e+02) * r - 2.759285104469687e+02) * r + 1.383577518672690e+02) * r - 3.066479806614716e+01) * r + 2.506628277459239e+00) * c
                / (((((-5.447609879822406e+01 * r + 1.615858368580409e+02) * r - 1.556989798598866e+02) * r + 6.680131188771972e+01) * r - 1.328068155288572e+01) * r + 1);
        }
    }
}
