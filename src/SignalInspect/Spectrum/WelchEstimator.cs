using System.Numerics;
using System.Runtime.InteropServices;
using SignalInspect.Capture;
using SignalInspect.Dsp;

namespace SignalInspect.Spectrum;

/// <summary>
/// Welch's method (Welch 1967): the capture is cut into segments of N samples, S = N - overlap
/// apart (segments that would run past the end are not used, as scipy.signal.welch does); each is
/// windowed (no detrending), transformed, and its periodogram |X|^2 is combined: mean (the PSD),
/// per-bin maximum (max-hold) and, per run of segments, a spectrogram row. One streaming pass,
/// memory independent of the capture's length; the segments are shared out between threads, each
/// with its own reader, FFT plan and sums.
/// Scaling follows scipy.signal.welch exactly: density = |X|^2 / (fs sum w^2), one-sided spectra
/// of real input double every bin but DC and Nyquist. Complex float captures (cf32, read as
/// stored) are transformed in single precision for power-of-two sizes from 64
/// (<see cref="FftPlan.ForwardPowerScrambledSingle"/>: their own precision, the sums in double);
/// every other input in double.
/// </summary>
public static class WelchEstimator
{
    private const int MinStagingSamples = 1 << 14;

    /// <summary>Estimates the spectrum of a window of a capture.</summary>
    /// <param name="source">The capture.</param>
    /// <param name="settings">FFT size, window, overlap, spectrogram size, threads.</param>
    /// <param name="firstSample">First sample of the analysed window.</param>
    /// <param name="sampleCount">Samples in the window; null for "to the end".</param>
    /// <param name="progress">Called now and then with the samples processed so far (from worker threads).</param>
    /// <param name="cancel">Stops the pass between segments.</param>
    /// <exception cref="CaptureException">The window holds fewer samples than one segment.</exception>
    /// <exception cref="SettingException">A setting is out of range (named by its property).</exception>
    public static SpectrumResult Estimate(
        CaptureSource source,
        SpectrumSettings settings,
        long firstSample = 0,
        long? sampleCount = null,
        Action<long>? progress = null,
        CancellationToken cancel = default
    )
    {
        settings.Validate();
        CaptureInfo info = source.Info;
        int n = settings.FftSize;
        int step = settings.StepSamples;
        long count = Math.Min(sampleCount ?? long.MaxValue, info.SampleCount - firstSample);
        long segments = count >= n ? (count - n) / step + 1 : 0;
        if (segments == 0)
            throw new SettingException(
                nameof(SpectrumSettings.FftSize),
                n,
                $"the window holds {Math.Max(count, 0)} samples, fewer than one FFT segment of {n}: use a smaller size",
                info.Path
            );
        Window window = Window.Create(settings.Window, n, settings.KaiserBeta);
        bool complex = info.IsComplex;
        int bins = complex ? n : n / 2 + 1;

        int rows = (int)Math.Min(settings.SpectrogramRows, segments);
        long perRow = (segments + rows - 1) / rows;
        rows = (int)((segments + perRow - 1) / perRow);
        int q = (bins + settings.SpectrogramColumns - 1) / settings.SpectrogramColumns;
        int columns = (bins + q - 1) / q;
        // Power-of-two sizes leave the bins of each transform in bit-reversed order (no permutation
        // per segment); the sums are put back in order once, at the end.
        var probe = new FftPlan(n);
        int[]? slots = probe.CanScramble ? [.. Enumerable.Range(0, n).Select(probe.ScrambledIndex)] : null;
        var layout = new Layout(n, step, complex, bins, info.SampleRateHz, window, perRow, segments, q, columns, slots)
        {
            RowMax = settings.SpectrogramAveraging == SpectrumAveraging.MaxHold,
        };

        int threads = Math.Max(1, Math.Min(settings.Threads ?? Environment.ProcessorCount, rows));
        var workers = new Worker[threads];
        // The rows are also the units of work shared between the threads, kept without a spectrogram.
        double[]? gram = settings.KeepSpectrogram ? new double[(long)rows * columns] : null;
        var sum = new double[n];
        var total = new InOrder<double[]>(
            () => new double[n],
            row =>
            {
                Span<Vector<double>> vs = MemoryMarshal.Cast<double, Vector<double>>(sum.AsSpan());
                ReadOnlySpan<Vector<double>> vr = MemoryMarshal.Cast<double, Vector<double>>(row.AsSpan());
                for (int v = 0; v < vs.Length; v++)
                    vs[v] += vr[v];
                for (int k = vs.Length * Vector<double>.Count; k < n; k++)
                    sum[k] += row[k];
                Array.Clear(row);
            }
        );
        long done = 0;
        int nextRow = -1;
        Action<long>? report = progress is null ? null : delta => progress(Interlocked.Add(ref done, delta));
        // The threads take rows in turn; each row's sum joins the total in row order, so that the
        // result does not depend on the thread count (a sum of doubles depends on its order).
        Parallel.For(
            0,
            threads,
            new ParallelOptions { MaxDegreeOfParallelism = threads, CancellationToken = cancel },
            w =>
            {
                var worker = workers[w] = new Worker(layout);
                using CaptureReader reader = source.OpenReader(firstSample, (segments - 1) * step + n);
                int r;
                while ((r = Interlocked.Increment(ref nextRow)) < rows)
                    worker.RunRow(reader, r, gram, total, report, cancel);
            }
        );
        // The sums, then scaled and ordered by ascending frequency.
        var max = new double[n];
        long nonFinite = 0;
        foreach (Worker wk in workers)
        {
            for (int k = 0; k < n; k++)
                max[k] = Math.Max(max[k], wk.Max[k]);
            nonFinite += wk.NonFiniteSegments;
        }
        double[] freqs = layout.Frequencies();
        double[] mean = layout.Order(sum, 1.0 / segments);
        double[] hold = layout.Order(max, 1.0);
        int dcBins = 0;
        if (settings.SuppressDc && complex)
        {
            dcBins = SuppressDc(mean, n / 2, window.MainLobeHalfWidthBins);
            SuppressDc(hold, n / 2, window.MainLobeHalfWidthBins);
            if (q == 1 && gram is not null)
                for (int r = 0; r < rows; r++)
                    SuppressDc(gram.AsSpan(r * columns, columns), n / 2, window.MainLobeHalfWidthBins);
        }
        double? centre = complex ? info.CenterFrequencyHz : null;
        var rowTimes = new double[rows];
        for (int r = 0; r < rows; r++)
        {
            long s0 = r * perRow,
                s1 = Math.Min(segments, (r + 1) * perRow) - 1;
            rowTimes[r] = (s0 * step + s1 * step + n) / 2.0 / info.SampleRateHz;
        }
        var colFreqs = new double[columns];
        for (int c = 0; c < columns; c++)
        {
            int a = c * q,
                b = Math.Min(bins, a + q) - 1;
            colFreqs[c] = (freqs[a] + freqs[b]) / 2;
        }
        return new SpectrumResult
        {
            Mean = new PowerSpectrum(
                freqs,
                mean,
                SpectrumScaling.DensityPerHz,
                SpectrumAveraging.Mean,
                settings,
                window,
                info.SampleRateHz,
                centre,
                !complex,
                segments
            ),
            MaxHold = new PowerSpectrum(
                freqs,
                hold,
                SpectrumScaling.DensityPerHz,
                SpectrumAveraging.MaxHold,
                settings,
                window,
                info.SampleRateHz,
                centre,
                !complex,
                segments
            ),
            Spectrogram = gram is null
                ? null
                : new Spectrogram(
                    rows,
                    columns,
                    gram,
                    rowTimes,
                    colFreqs,
                    (int)perRow,
                    settings.SpectrogramAveraging,
                    settings.CalibrationDb
                ),
            FirstSample = firstSample,
            SamplesAnalysed = (segments - 1) * step + n,
            DcBinsSuppressed = dcBins,
            NonFiniteSegments = nonFinite,
            Threads = threads,
        };
    }

    /// <summary>Replaces bins centre-hw..centre+hw by a straight line between their neighbours; returns the bins
    /// replaced.</summary>
    private static int SuppressDc(Span<double> v, int centre, int hw)
    {
        int lo = centre - hw - 1,
            hi = centre + hw + 1;
        if (lo < 0 || hi >= v.Length)
            return 0;
        for (int i = lo + 1; i < hi; i++)
            v[i] = v[lo] + (v[hi] - v[lo]) * (i - lo) / (hi - lo);
        return hi - lo - 1;
    }

    /// <summary>The fixed geometry of one estimate: bin order, scaling, rows.</summary>
    private sealed class Layout(
        int n,
        int step,
        bool complex,
        int bins,
        double fs,
        Window window,
        long perRow,
        long segments,
        int q,
        int columns,
        int[]? slots
    )
    {
        public int N => n;
        public bool Complex => complex;
        public int Step => step;
        public Window Window => window;
        public long PerRow => perRow;
        public long Segments => segments;
        public int Columns => columns;
        public bool RowMax { get; init; }

        private readonly double _density = 1.0 / (fs * window.SumOfSquares);

        /// <summary>Whether the transforms leave their bins in bit-reversed order.</summary>
        public bool Scrambled => slots is not null;

        /// <summary>Where the sums hold output index i (ascending frequency): its FFT bin, bit-reversed when the
        /// transforms leave it so.</summary>
        public int BinOf(int i)
        {
            int bin = complex ? (i - n / 2 + n) % n : i;
            return slots is null ? bin : slots[bin];
        }

        public double[] Frequencies()
        {
            var f = new double[bins];
            for (int i = 0; i < bins; i++)
                f[i] = (complex ? i - n / 2 : i) * fs / n;
            return f;
        }

        /// <summary>Density of output index i from a raw |X|^2 value: 1/(fs sum w^2), doubled for one-sided interior
        /// bins.</summary>
        public double Scale(int i)
        {
            if (complex)
                return _density;
            bool nyquist = n % 2 == 0 && i == n / 2;
            return i == 0 || nyquist ? _density : 2 * _density;
        }

        // BinOf and Scale of every output index, for the per-row spectrogram writes.
        private int[]? _binOf;
        private double[]? _scaleOf;

        public double[] Order(double[] raw, double factor)
        {
            var o = new double[bins];
            for (int i = 0; i < bins; i++)
                o[i] = raw[BinOf(i)] * Scale(i) * factor;
            return o;
        }

        /// <summary>Writes a finished row (raw sums over its segments) into the spectrogram.</summary>
        public void WriteRow(double[] gram, int row, double[] raw, long segmentsInRow, bool mean)
        {
            int[] binOf = LazyInitializer.EnsureInitialized(ref _binOf, () =>
                [.. Enumerable.Range(0, bins).Select(BinOf)]
            );
            double[] scaleOf = LazyInitializer.EnsureInitialized(ref _scaleOf, () =>
                [.. Enumerable.Range(0, bins).Select(Scale)]
            );
            double f = mean ? 1.0 / segmentsInRow : 1.0;
            Span<double> dst = gram.AsSpan(row * columns, columns);
            for (int c = 0; c < columns; c++)
            {
                int a = c * q,
                    b = Math.Min(bins, a + q);
                double s = 0;
                for (int i = a; i < b; i++)
                    s += raw[binOf[i]] * scaleOf[i];
                dst[c] = s * f / (b - a);
            }
        }
    }

    /// <summary>One thread's FFT plan, buffers and max-hold; runs rows one after another.</summary>
    private sealed class Worker
    {
        private readonly Layout _l;
        private readonly FftPlan _fft;
        private readonly bool _scrambled;
        private readonly double[] _re,
            _im,
            _w,
            _row;
        private readonly float[]? _wSingle; // the window in float, where float segments are transformed in float
        private double[]? _staging;
        private double[] _rowSum; // the row's periodogram sum, handed to the total when the row ends

        public Worker(Layout layout)
        {
            _l = layout;
            _fft = new FftPlan(layout.N);
            _scrambled = layout.Scrambled;
            _re = new double[layout.N];
            _im = new double[layout.N];
            _w = layout.Window.Coefficients.ToArray();
            if (_scrambled && layout.Complex && _fft.CanSingle)
                _wSingle = [.. _w.Select(v => (float)v)];
            _row = new double[layout.N];
            _rowSum = new double[layout.N];
            Max = new double[layout.N];
        }

        /// <summary>Staging values for a row: read-ahead of several segments plus one.</summary>
        private int StagingValues => (Math.Max(MinStagingSamples, 4 * _l.N) + _l.N) * (_l.Complex ? 2 : 1);

        public double[] Max { get; }
        public long NonFiniteSegments { get; private set; }

        /// <summary>The segments of spectrogram row r: its row, its share of the max-hold, its sum into the
        /// total.</summary>
        public void RunRow(
            CaptureReader reader,
            int r,
            double[]? gram,
            InOrder<double[]> total,
            Action<long>? report,
            CancellationToken cancel
        )
        {
            // float32 captures are taken as stored, each segment a view of the file (no copy where it
            // is mapped), and widened as the scrambled transform loads them (the same values).
            if (reader.DeliversFloat32 && _scrambled)
                RunRowViews(reader, r, gram, total, report, cancel);
            else
                RunRow(reader, _staging ??= new double[StagingValues], r, gram, total, report, cancel);
        }

        private void RunRowViews(
            CaptureReader reader,
            int r,
            double[]? gram,
            InOrder<double[]> total,
            Action<long>? report,
            CancellationToken cancel
        )
        {
            int n = _l.N,
                step = _l.Step,
                vps = reader.ValuesPerSample;
            var (seg0, seg1) = SegmentsOf(r);
            long segment = seg0;
            Array.Clear(_row);
            for (; segment < seg1; segment++)
            {
                cancel.ThrowIfCancellationRequested();
                ReadOnlySpan<float> x = reader.Float32View(segment * step, n);
                if (x.Length < n * vps)
                    break;
                report?.Invoke(segment == seg0 ? n : step);
                Periodogram(x, vps == 2);
            }
            EndRow(r, segment - seg0, gram, total);
        }

        /// <summary>The segments of row r: the first, and one past the last.</summary>
        private (long First, long End) SegmentsOf(int r) => (r * _l.PerRow, Math.Min(_l.Segments, (r + 1) * _l.PerRow));

        private void EndRow(int r, long segments, double[]? gram, InOrder<double[]> total)
        {
            if (gram is not null)
                _l.WriteRow(gram, r, _scrambled && !_l.RowMax ? _rowSum : _row, segments, !_l.RowMax);
            total.Complete(r, _rowSum);
            _rowSum = total.Rent();
        }

        private void RunRow(
            CaptureReader reader,
            double[] staging,
            int r,
            double[]? gram,
            InOrder<double[]> total,
            Action<long>? report,
            CancellationToken cancel
        )
        {
            int n = _l.N,
                step = _l.Step,
                vps = reader.ValuesPerSample;
            var (seg0, seg1) = SegmentsOf(r);
            reader.Seek(seg0 * step);
            long left = (seg1 - seg0 - 1) * step + n; // samples this row needs
            int filled = 0,
                pos = 0;
            long segment = seg0;
            Array.Clear(_row);
            while (segment < seg1)
            {
                cancel.ThrowIfCancellationRequested();
                if (pos + n > filled)
                {
                    int keep = filled - pos;
                    staging.AsSpan(pos * vps, keep * vps).CopyTo(staging);
                    filled = keep;
                    pos = 0;
                    int want = (int)Math.Min(staging.Length / vps - filled, left);
                    int got = want <= 0 ? 0 : reader.Read(staging.AsSpan(filled * vps, want * vps));
                    if (got == 0)
                        break;
                    filled += got;
                    left -= got;
                    report?.Invoke(got);
                    continue;
                }
                Periodogram<double>(staging.AsSpan(pos * vps, n * vps), vps == 2);
                segment++;
                pos += step;
            }
            EndRow(r, segment - seg0, gram, total);
        }

        private void Periodogram<T>(ReadOnlySpan<T> samples, bool complex)
            where T : unmanaged
        {
            if (_scrambled)
            {
                // Transform and sums in one go; a segment with NaN or infinity adds nothing and is redone with those
                // samples as 0. A mean spectrogram row is the row's sum itself: no separate row is accumulated.
                Span<double> row = _l.RowMax ? _row : default;
                // Complex float samples (cf32 as stored) are transformed in float: their own precision.
                double check =
                    typeof(T) == typeof(float)
                        ? _wSingle is not null
                            ? _fft.ForwardPowerScrambledSingle(
                                MemoryMarshal.Cast<T, float>(samples),
                                _wSingle,
                                _w,
                                _re,
                                _im,
                                _rowSum,
                                Max,
                                row,
                                _l.RowMax
                            )
                            : _fft.ForwardPowerScrambled(
                                MemoryMarshal.Cast<T, float>(samples),
                                complex,
                                _w,
                                _re,
                                _im,
                                _rowSum,
                                Max,
                                row,
                                _l.RowMax
                            )
                        : _fft.ForwardPowerScrambled(
                            MemoryMarshal.Cast<T, double>(samples),
                            complex,
                            _w,
                            _re,
                            _im,
                            _rowSum,
                            Max,
                            row,
                            _l.RowMax
                        );
                if (double.IsFinite(check))
                    return;
                NonFiniteSegments++;
                _fft.ForwardPowerScrambled(Clean(samples), complex, _w, _re, _im, _rowSum, Max, row, _l.RowMax);
                return;
            }
            // Float staging only with the scrambled transform.
            ReadOnlySpan<double> x = MemoryMarshal.Cast<T, double>(samples);
            if (!double.IsFinite(_fft.ForwardWindowed(x, complex, _w, _re, _im)))
            {
                NonFiniteSegments++;
                _fft.ForwardWindowed(Clean(x), complex, _w, _re, _im);
            }
            Accumulate();
        }

        private static double[] Widen(ReadOnlySpan<float> x)
        {
            var d = new double[x.Length];
            for (int i = 0; i < d.Length; i++)
                d[i] = x[i];
            return d;
        }

        /// <summary>The segment with NaN and infinite samples taken as 0.</summary>
        private static double[] Clean<T>(ReadOnlySpan<T> samples)
            where T : unmanaged
        {
            ReadOnlySpan<double> x =
                typeof(T) == typeof(double)
                    ? MemoryMarshal.Cast<T, double>(samples)
                    : Widen(MemoryMarshal.Cast<T, float>(samples));
            var clean = new double[x.Length];
            for (int i = 0; i < clean.Length; i++)
                clean[i] = double.IsFinite(x[i]) ? x[i] : 0;
            return clean;
        }

        /// <summary>|X|^2 of the transformed segment into the sum, the max-hold and the current row, in one
        /// pass.</summary>
        private void Accumulate()
        {
            int vw = Vector<double>.Count;
            ReadOnlySpan<Vector<double>> vre = MemoryMarshal.Cast<double, Vector<double>>(_re.AsSpan());
            ReadOnlySpan<Vector<double>> vim = MemoryMarshal.Cast<double, Vector<double>>(_im.AsSpan());
            Span<Vector<double>> vsum = MemoryMarshal.Cast<double, Vector<double>>(_rowSum.AsSpan());
            Span<Vector<double>> vmax = MemoryMarshal.Cast<double, Vector<double>>(Max.AsSpan());
            Span<Vector<double>> vrow = MemoryMarshal.Cast<double, Vector<double>>(_row.AsSpan());
            bool rowMax = _l.RowMax;
            for (int v = 0; v < vre.Length; v++)
            {
                Vector<double> p = vre[v] * vre[v] + vim[v] * vim[v];
                vsum[v] += p;
                vmax[v] = Vector.Max(vmax[v], p);
                vrow[v] = rowMax ? Vector.Max(vrow[v], p) : vrow[v] + p;
            }
            for (int k = vre.Length * vw; k < _l.N; k++)
            {
                double p = _re[k] * _re[k] + _im[k] * _im[k];
                _rowSum[k] += p;
                Max[k] = Math.Max(Max[k], p);
                _row[k] = rowMax ? Math.Max(_row[k], p) : _row[k] + p;
            }
        }
    }
}
