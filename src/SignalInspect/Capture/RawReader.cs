namespace SignalInspect.Capture;

/// <summary>
/// Headerless raw sample files. The datatype comes from the reader options or the file ending
/// (<c>.cu8</c>, <c>.cs16</c>, <c>.cf32</c> ...); the sample rate must be given. A tail shorter
/// than one sample is ignored with a warning.
/// </summary>
internal static class RawReader
{
    public static CaptureSource Open(string path, ReaderOptions options)
    {
        long size = ByteSource.LengthOf(path);
        var notes = new List<string>();
        SampleFormat format;
        if (options.Datatype is { } word)
        {
            if (!SampleFormat.TryParse(word, out format, out string error))
                throw new SettingException(nameof(ReaderOptions.Datatype), word, error, path);
        }
        else if (CaptureFormats.DatatypeOfEnding(path) is { } ending)
        {
            format = SampleFormat.Parse(ending);
            notes.Add($"datatype {format.Name} taken from the file ending (give --datatype to change it)");
        }
        else
        {
            throw new SettingException(
                nameof(ReaderOptions.Datatype),
                null,
                "needed: not a WAV or SigMF file, and a raw file's ending names no datatype (e.g. cu8, ci16_le, "
                    + "cf32_le; the sample rate is needed too)",
                path
            );
        }
        double rate = CaptureSource.CheckRate(
            path,
            options.SampleRateHz,
            options.SampleRateHz is null ? "a raw file has no header" : CaptureSource.UserGiven
        );
        var warnings = new List<string>();
        long tail = size % format.BytesPerSample;
        if (tail != 0)
            warnings.Add(
                $"file length is not a whole number of {format.Name} samples: the last {tail} byte(s) are ignored"
            );
        long samples = size / format.BytesPerSample;
        if (samples == 0)
            throw CaptureException.ForFile(path, $"holds no whole {format.Name} sample ({size} bytes)");
        var (pick, complex, use) = CaptureSource.PickChannels(path, format, 1, options);
        var info = new CaptureInfo
        {
            Path = path,
            DataPath = path,
            Container = "raw",
            SampleRateHz = rate,
            CenterFrequencyHz = options.CenterFrequencyHz,
            IsComplex = complex,
            SampleCount = samples,
            Channels = 1,
            ChannelUse = use,
            Datatype = format.Name,
            FileSizeBytes = size,
            Notes = notes,
            Warnings = warnings,
        };
        FileExtent[] extents = [new FileExtent(0, samples * format.BytesPerSample)];
        return new CaptureSource(
            info,
            () => new FileExtentSource(path, extents),
            format,
            format.ComponentsPerSample,
            pick
        );
    }
}
