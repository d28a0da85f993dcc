using System.Globalization;

namespace SignalInspect.Dsp;

/// <summary>Data windows for spectrum estimation.</summary>
public enum WindowKind
{
    /// <summary>Rectangular (no window).</summary>
    Rectangular,

    /// <summary>Hann (raised cosine), a0 = 0.5.</summary>
    Hann,

    /// <summary>Hamming, a0 = 0.54.</summary>
    Hamming,

    /// <summary>4-term Blackman-Harris (Harris 1978, 92 dB sidelobes): 0.35875, 0.48829, 0.14128, 0.01168.</summary>
    BlackmanHarris,

    /// <summary>Flat-top (the 5-term coefficients scipy.signal.windows.flattop uses), for amplitude accuracy.</summary>
    FlatTop,

    /// <summary>Kaiser with shape parameter beta.</summary>
    Kaiser,
}

/// <summary>
/// A window of N points in its periodic form (the DFT-even form used for spectra, as
/// scipy.signal.get_window(fftbins=True) gives it: the symmetric window of N + 1 points without
/// its last point), with the figures of merit defined by Harris (1978), "On the use of windows
/// for harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1).
/// </summary>
public sealed class Window
{
    private readonly double[] _w;

    private Window(WindowKind kind, double beta, double[] w)
    {
        Kind = kind;
        KaiserBeta = beta;
        _w = w;
        double sum = 0,
            sum2 = 0;
        foreach (double v in w)
        {
            sum += v;
            sum2 += v * v;
        }
        Sum = sum;
        SumOfSquares = sum2;
    }

    // Response half a bin off centre, relative to the centre: the worst-case scalloping (two
    // trigonometric calls per point, so worked out only when asked for).
    private double ScallopingLoss()
    {
        double re = 0,
            im = 0;
        for (int n = 0; n < _w.Length; n++)
        {
            double a = -Math.PI * n / _w.Length;
            re += _w[n] * Math.Cos(a);
            im += _w[n] * Math.Sin(a);
        }
        return -20 * Math.Log10(Math.Sqrt(re * re + im * im) / Sum);
    }

    /// <summary>Creates a periodic window.</summary>
    /// <param name="kind">Window shape.</param>
    /// <param name="size">Points N, 1 or more.</param>
    /// <param name="kaiserBeta">Kaiser shape parameter (ignored by other kinds), 0 or more; default 8.6.</param>
    /// <exception cref="ArgumentOutOfRangeException">Size below 1 or a negative beta.</exception>
    public static Window Create(WindowKind kind, int size, double kaiserBeta = 8.6)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(size, 1);
        if (kind == WindowKind.Kaiser && (!double.IsFinite(kaiserBeta) || kaiserBeta < 0))
            throw new ArgumentOutOfRangeException(nameof(kaiserBeta), kaiserBeta, "must be 0 or more");
        // Windows are immutable: the large ones are kept and shared (each analysis builds the same few).
        if (size < 1024)
            return Build(kind, size, kaiserBeta);
        var key = (kind, size, kind == WindowKind.Kaiser ? kaiserBeta : 0.0);
        if (Cache.TryGetValue(key, out Window? hit))
            return hit;
        Window made = Build(kind, size, kaiserBeta);
        if (Cache.Count >= 32)
            Cache.Clear();
        return Cache.GetOrAdd(key, made);
    }

    private static readonly System.Collections.Concurrent.ConcurrentDictionary<
        (WindowKind, int, double),
        Window
    > Cache = new();

    private static Window Build(WindowKind kind, int size, double kaiserBeta)
    {
        var w = new double[size];
        int m = size; // periodic: denominators use N (the symmetric window of N + 1 points)
        for (int n = 0; n < size; n++)
        {
            double x = 2 * Math.PI * n / m;
            double c = kind is WindowKind.Kaiser or WindowKind.Rectangular ? 0 : Math.Cos(x);
            // cos 2x, 3x and 4x from cos x by the multiple-angle formulas (one cosine per point; absolute error below
            // 1e-15).
            double c2 = 2 * c * c - 1,
                c3 = c * (2 * c2 - 1),
                c4 = 2 * c2 * c2 - 1;
            w[n] = kind switch
            {
                WindowKind.Rectangular => 1.0,
                WindowKind.Hann => 0.5 - 0.5 * c,
                WindowKind.Hamming => 0.54 - 0.46 * c,
                WindowKind.BlackmanHarris => 0.35875 - 0.48829 * c + 0.14128 * c2 - 0.01168 * c3,
                WindowKind.FlatTop => 0.21557895
                    - 0.41663158 * c
                    + 0.277263158 * c2
                    - 0.083578947 * c3
                    + 0.006947368 * c4,
                _ => Kaiser.Taper(kaiserBeta, Math.Pow(2.0 * n / m - 1, 2)) / Kaiser.Peak(kaiserBeta),
            };
        }
        return new Window(kind, kind == WindowKind.Kaiser ? kaiserBeta : double.NaN, w);
    }

    /// <summary>
    /// Parses a window name: <c>rectangular</c> (or <c>boxcar</c>), <c>hann</c>, <c>hamming</c>,
    /// <c>blackmanharris</c>, <c>flattop</c>, <c>kaiser</c> or <c>kaiser:BETA</c>.
    /// </summary>
    /// <exception cref="ArgumentException">The name is none of these.</exception>
    public static (WindowKind Kind, double Beta) ParseName(string name)
    {
        string s = name.Trim().ToLowerInvariant().Replace("-", string.Empty).Replace("_", string.Empty);
        double beta = 8.6;
        if (s.StartsWith("kaiser:", StringComparison.Ordinal))
        {
            if (
                !double.TryParse(s[7..], NumberStyles.Float, CultureInfo.InvariantCulture, out beta)
                || beta < 0
                || !double.IsFinite(beta)
            )
                throw new ArgumentException(
                    $"window '{name}': the Kaiser beta must be a number of 0 or more (e.g. kaiser:8.6)"
                );
            s = "kaiser";
        }
        WindowKind kind = s switch
        {
            "rectangular" or "rect" or "boxcar" or "none" => WindowKind.Rectangular,
            "hann" or "hanning" => WindowKind.Hann,
            "hamming" => WindowKind.Hamming,
            "blackmanharris" or "bh4" => WindowKind.BlackmanHarris,
            "flattop" => WindowKind.FlatTop,
            "kaiser" => WindowKind.Kaiser,
            _ => throw new ArgumentException(
                $"unknown window '{name}' (rectangular, hann, hamming, blackmanharris, flattop, kaiser:BETA)"
            ),
        };
        return (kind, beta);
    }

    /// <summary>Window shape.</summary>
    public WindowKind Kind { get; }

    /// <summary>Kaiser beta; NaN for other kinds.</summary>
    public double KaiserBeta { get; }

    /// <summary>A short name, e.g. "hann", "kaiser(beta=8.6)".</summary>
    public string Name =>
        Kind switch
        {
            WindowKind.Kaiser => string.Create(CultureInfo.InvariantCulture, $"kaiser(beta={KaiserBeta:0.###})"),
            WindowKind.BlackmanHarris => "blackmanharris",
            WindowKind.FlatTop => "flattop",
            _ => Kind.ToString().ToLowerInvariant(),
        };

    /// <summary>Points N.</summary>
    public int Size => _w.Length;

    /// <summary>The coefficients.</summary>
    public ReadOnlySpan<double> Coefficients => _w;

    /// <summary>Sum of the coefficients.</summary>
    public double Sum { get; }

    /// <summary>Sum of the squared coefficients.</summary>
    public double SumOfSquares { get; }

    /// <summary>Coherent gain: sum(w) / N (Harris 1978, Table 1).</summary>
    public double CoherentGain => Sum / Size;

    /// <summary>Equivalent noise bandwidth in bins: N sum(w^2) / (sum w)^2 (Harris 1978, Table 1).</summary>
    public double EnbwBins => Size * SumOfSquares / (Sum * Sum);

    /// <summary>Equivalent noise bandwidth in Hz at a sample rate: ENBW(bins) x fs / N.</summary>
    public double EnbwHz(double sampleRateHz) => EnbwBins * sampleRateHz / Size;

    /// <summary>Worst-case scalloping loss in dB: the response to a tone half a bin off centre (Harris 1978, Table
    /// 1).</summary>
    public double ScallopingLossDb
    {
        get
        {
            // Windows are shared between threads: a double is written whole, so a reader sees NaN or the value.
            double v = _scallopingLossDb;
            if (double.IsNaN(v))
                _scallopingLossDb = v = ScallopingLoss();
            return v;
        }
    }

    private double _scallopingLossDb = double.NaN;

    /// <summary>Half-width of the main lobe in bins (to its first null), for blanking a spectral line.</summary>
    public int MainLobeHalfWidthBins =>
        Kind switch
        {
            WindowKind.Rectangular => 1,
            WindowKind.Hann or WindowKind.Hamming => 2,
            WindowKind.BlackmanHarris => 4,
            WindowKind.FlatTop => 5,
            _ => (int)Math.Ceiling(Math.Sqrt(1 + Math.Pow(KaiserBeta / Math.PI, 2))),
        };
}
