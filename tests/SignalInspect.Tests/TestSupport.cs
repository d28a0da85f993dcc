using System.Security.Cryptography;
using SignalInspect.Capture;

namespace SignalInspect.Tests;

/// <summary>Finds the committed reference files in testdata/.</summary>
internal static class TestData
{
    private static readonly Lazy<string> RootDir = new(() =>
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(System.IO.Path.Combine(dir.FullName, "SignalInspect.sln")))
            dir = dir.Parent;
        return dir is null
            ? throw new InvalidOperationException("cannot find the repository root (SignalInspect.sln)")
            : System.IO.Path.Combine(dir.FullName, "testdata");
    });

    public static string Path(params string[] parts) => System.IO.Path.Combine([RootDir.Value, .. parts]);

    /// <summary>A path in the repository (the folder that holds SignalInspect.sln).</summary>
    public static string Repo(params string[] parts) =>
        System.IO.Path.Combine([System.IO.Path.GetDirectoryName(RootDir.Value)!, .. parts]);

    /// <summary>Reads a raw little-endian float64 file (sox's -t f64 output).</summary>
    public static double[] ReadF64(string path)
    {
        byte[] b = File.ReadAllBytes(path);
        var v = new double[b.Length / 8];
        Buffer.BlockCopy(b, 0, v, 0, v.Length * 8);
        return v;
    }

    /// <summary>Reads a whole capture through the streaming reader, in small odd-sized blocks to cross buffer
    /// edges.</summary>
    public static double[] ReadAll(CaptureSource source, int blockSamples = 333)
    {
        using CaptureReader reader = source.OpenReader();
        var all = new List<double>();
        var block = new double[blockSamples * reader.ValuesPerSample];
        int n;
        while ((n = reader.Read(block)) > 0)
            all.AddRange(block.AsSpan(0, n * reader.ValuesPerSample).ToArray());
        return [.. all];
    }

    public static string Sha256(string path)
    {
        using FileStream fs = File.OpenRead(path);
        return Convert.ToHexString(SHA256.HashData(fs));
    }
}

/// <summary>A temporary folder removed at the end of a test.</summary>
internal sealed class TempDir : IDisposable
{
    public TempDir()
    {
        Path = Directory.CreateTempSubdirectory("signalinspect-test-").FullName;
    }

    public string Path { get; }

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public void Dispose()
    {
        try
        {
            Directory.Delete(Path, recursive: true);
        }
        catch (IOException) { }
    }
}

/// <summary>Runs the command line in-process and captures what it prints.</summary>
internal static class CliRunner
{
    public static (int Code, string Out, string Err) Run(params string[] args)
    {
        var o = new StringWriter();
        var e = new StringWriter();
        int code = SignalInspect.Cli.Cli.Run(args, o, e);
        return (code, o.ToString(), e.ToString());
    }
}

/// <summary>Assertions with an explicit absolute tolerance (xunit's precision argument rounds, which misleads at the
/// edge).</summary>
internal static class Near
{
    public static void Equal(double expected, double actual, double tolerance, string? what = null)
    {
        Assert.True(
            Math.Abs(expected - actual) <= tolerance,
            $"{what ?? "value"}: expected {expected:R} +/- {tolerance:R}, got {actual:R} "
                + $"(off by {Math.Abs(expected - actual):G3})"
        );
    }
}

/// <summary>Runs code on the 256-bit kernels (<paramref name="narrow"/>) or on those the CPU has (512-bit where it
/// can), for the calling flow only, then restores the default.</summary>
internal static class VectorWidth
{
    public static T Run<T>(bool narrow, Func<T> run)
    {
        SignalInspect.Dsp.Simd.NarrowForTests = narrow;
        try
        {
            return run();
        }
        finally
        {
            SignalInspect.Dsp.Simd.NarrowForTests = false;
        }
    }

    public static void Run(bool narrow, Action run) => Run(narrow, () =>
        {
            run();
            return 0;
        });
}
