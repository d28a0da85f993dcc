using System.Text.RegularExpressions;

namespace SignalInspect.Capture;

/// <summary>Numeric encoding of one sample component (one of I, Q or a real value).</summary>
public enum ComponentEncoding
{
    /// <summary>IEEE 754 binary32.</summary>
    Float32,

    /// <summary>IEEE 754 binary64.</summary>
    Float64,

    /// <summary>Two's complement 8-bit integer.</summary>
    Int8,

    /// <summary>Two's complement 16-bit integer.</summary>
    Int16,

    /// <summary>Two's complement 24-bit integer (WAV only; not a SigMF datatype).</summary>
    Int24,

    /// <summary>Two's complement 32-bit integer.</summary>
    Int32,

    /// <summary>Unsigned 8-bit integer (offset binary).</summary>
    UInt8,

    /// <summary>Unsigned 16-bit integer (offset binary).</summary>
    UInt16,

    /// <summary>Unsigned 32-bit integer (offset binary).</summary>
    UInt32,
}

/// <summary>
/// How the samples of a capture are laid out on disk and how a stored code maps to a value in
/// full-scale units (amplitude 1.0 is full scale: |x| = 1 for complex, +/-1 for real).
/// Named with the SigMF v1.2 datatype grammar: <c>(r|c)(f32|f64|i32|i16|u32|u16)_(le|be)</c> or
/// <c>(r|c)(i8|u8)</c>.
/// </summary>
/// <param name="IsComplex">True for interleaved I/Q pairs (I first), false for real samples.</param>
/// <param name="Encoding">Encoding of each component.</param>
/// <param name="BigEndian">Byte order of multi-byte components.</param>
/// <param name="UnsignedOffset">
/// For unsigned encodings, the code that stands for zero. SigMF/raw captures use the midpoint
/// of the code range (127.5 for <c>cu8</c>, the usual receiver convention); WAV 8-bit PCM uses 128.
/// </param>
public readonly record struct SampleFormat(
    bool IsComplex,
    ComponentEncoding Encoding,
    bool BigEndian,
    double UnsignedOffset
)
{
    private static readonly Regex Grammar = new(
        "^(?<kind>[rc])(?:(?<wide>f32|f64|i32|i16|u32|u16)_(?<endian>le|be)|(?<narrow>i8|u8))$",
        RegexOptions.CultureInvariant
    );

    /// <summary>Bytes in one component.</summary>
    public int BytesPerComponent =>
        Encoding switch
        {
            ComponentEncoding.Int8 or ComponentEncoding.UInt8 => 1,
            ComponentEncoding.Int16 or ComponentEncoding.UInt16 => 2,
            ComponentEncoding.Int24 => 3,
            ComponentEncoding.Float64 => 8,
            _ => 4,
        };

    /// <summary>Components in one sample of one channel: 2 for complex, 1 for real.</summary>
    public int ComponentsPerSample => IsComplex ? 2 : 1;

    /// <summary>Bytes in one sample of one channel.</summary>
    public int BytesPerSample => BytesPerComponent * ComponentsPerSample;

    /// <summary>
    /// Scale from a stored code (after removing <see cref="UnsignedOffset"/>) to full-scale units:
    /// value = (code - offset) / <see cref="CodeFullScale"/>.
    /// </summary>
    public double CodeFullScale =>
        Encoding switch
        {
            ComponentEncoding.Float32 or ComponentEncoding.Float64 => 1.0,
            ComponentEncoding.Int8 => 128.0,
            ComponentEncoding.Int16 => 32768.0,
            ComponentEncoding.Int24 => 8388608.0,
            ComponentEncoding.Int32 => 2147483648.0,
            _ => UnsignedOffset,
        };

    /// <summary>True for the unsigned (offset binary) encodings.</summary>
    public bool IsUnsigned =>
        Encoding is ComponentEncoding.UInt8 or ComponentEncoding.UInt16 or ComponentEncoding.UInt32;

    /// <summary>True for the floating-point encodings.</summary>
    public bool IsFloat => Encoding is ComponentEncoding.Float32 or ComponentEncoding.Float64;

    /// <summary>The datatype word, e.g. <c>cf32_le</c>, <c>ri16_le</c>, <c>cu8</c>; <c>ri24_le</c> for 24-bit
    /// WAV.</summary>
    public string Name
    {
        get
        {
            string kind = IsComplex ? "c" : "r";
            string body = Encoding switch
            {
                ComponentEncoding.Float32 => "f32",
                ComponentEncoding.Float64 => "f64",
                ComponentEncoding.Int8 => "i8",
                ComponentEncoding.Int16 => "i16",
                ComponentEncoding.Int24 => "i24",
                ComponentEncoding.Int32 => "i32",
                ComponentEncoding.UInt8 => "u8",
                ComponentEncoding.UInt16 => "u16",
                _ => "u32",
            };
            return BytesPerComponent == 1 ? kind + body : kind + body + (BigEndian ? "_be" : "_le");
        }
    }

    /// <inheritdoc />
    public override string ToString() => Name;

    /// <summary>Parses a SigMF datatype word. Returns false with a one-line reason when it is not one.</summary>
    public static bool TryParse(string? datatype, out SampleFormat format, out string error)
    {
        format = default;
        string text = (datatype ?? string.Empty).Trim();
        Match m = Grammar.Match(text);
        if (!m.Success)
        {
            error =
                $"unknown datatype '{text}' (expected a SigMF datatype such as cu8, ci8, ci16_le, cf32_le, rf32_le)";
            return false;
        }
        bool complex = m.Groups["kind"].Value == "c";
        string body = m.Groups["wide"].Success ? m.Groups["wide"].Value : m.Groups["narrow"].Value;
        bool big = m.Groups["endian"].Value == "be";
        ComponentEncoding enc = body switch
        {
            "f32" => ComponentEncoding.Float32,
            "f64" => ComponentEncoding.Float64,
            "i8" => ComponentEncoding.Int8,
            "i16" => ComponentEncoding.Int16,
            "i32" => ComponentEncoding.Int32,
            "u8" => ComponentEncoding.UInt8,
            "u16" => ComponentEncoding.UInt16,
            _ => ComponentEncoding.UInt32,
        };
        double offset = enc switch
        {
            ComponentEncoding.UInt8 => 127.5,
            ComponentEncoding.UInt16 => 32767.5,
            ComponentEncoding.UInt32 => 2147483647.5,
            _ => 0.0,
        };
        format = new SampleFormat(complex, enc, big, offset);
        error = string.Empty;
        return true;
    }

    /// <summary>Parses a SigMF datatype word.</summary>
    /// <exception cref="CaptureException">The word is not a SigMF datatype.</exception>
    public static SampleFormat Parse(string datatype) =>
        TryParse(datatype, out SampleFormat f, out string error) ? f : throw new CaptureException(error);
}
