using System.Text.Json.Nodes;
using Json.Schema;

namespace SignalInspect.Tests.Reporting;

/// <summary>
/// The published JSON Schemas (issue 25, item 2; JSON Schema 2020-12, docs/schema/) against real outputs, validated
/// with JsonSchema.Net: analyze for every modulation class, keyed transmissions, a judged failing capture and a
/// reference correction; the report model; info; batch records (good and error rows). Every key a schema lists is
/// required and no other is allowed, so a key dropped or added without the schema fails here.
/// </summary>
public class SchemaTests
{
    private static JsonSchema Schema(string name) =>
        JsonSchema.FromText(File.ReadAllText(TestData.Repo("docs", "schema", name + ".schema.json")));

    private static void Valid(JsonSchema schema, string json, string what)
    {
        EvaluationResults r = schema.Evaluate(
            JsonNode.Parse(json),
            new EvaluationOptions { OutputFormat = OutputFormat.List }
        );
        string errors = string.Join(
            "; ",
            r.Details.Where(d => d.Errors is { Count: > 0 })
                .Select(d => $"{d.InstanceLocation}: {string.Join(", ", d.Errors!.Values)}")
                .Take(5)
        );
        Assert.True(r.IsValid, $"{what}: {errors}");
    }

    private static string Synth(TempDir tmp, string name, params string[] args)
    {
        string path = tmp.File(name + ".sigmf-meta");
        string[] all = ["synth", path, "--sample-rate", "48k", "--center-frequency", "155M", "--snr", "30", .. args];
        var (code, _, err) = CliRunner.Run(all);
        Assert.True(code == 0, err);
        return path;
    }

    [Fact]
    public void Analyze_info_report_and_batch_outputs_follow_their_schemas()
    {
        using var tmp = new TempDir();
        JsonSchema analyze = Schema("analyze"),
            report = Schema("report"),
            info = Schema("info"),
            batch = Schema("batch-record");
        var captures = new List<string>();
        foreach (string kind in new[] { "fm", "am", "cw", "fsk", "ook", "qam", "noise", "pulse" })
            captures.Add(Synth(tmp, kind, "--kind", kind, "--offset", "2000"));
        captures.Add(Synth(tmp, "burst", "--kind", "fm", "--duration", "5", "--burst", "1:2.5", "--burst", "3.2:4.5"));
        foreach (string c in captures)
        {
            var (code, json, err) = CliRunner.Run("analyze", c, "--json", "-");
            Assert.True(code == 0, err);
            Valid(analyze, json, Path.GetFileName(c));
            (code, json, err) = CliRunner.Run("info", c, "--json");
            Assert.True(code == 0, err);
            Valid(info, json, "info " + Path.GetFileName(c));
        }
        // Discriminator audio: no carrier, no RF bandwidths (nulls where the schema allows them).
        string disc = tmp.File("disc.wav");
        Assert.Equal(
            0,
            CliRunner.Run("synth", disc, "--real", "--kind", "fm", "--discriminator", "5k", "--snr", "40").Code
        );
        var (dc, discJson, discErr) = CliRunner.Run("analyze", disc, "--discriminator", "5k", "--json", "-");
        Assert.True(dc == 0, discErr);
        Valid(analyze, discJson, "discriminator audio");
        string fm = captures[0];
        // Judged: the keyed capture against the land-mobile profile has checks of every kind, transients included.
        string profile = TestData.Repo("profiles", "land-mobile-12k5-vhf.json");
        var (judged, judgedJson, judgedErr) = CliRunner.Run(
            "analyze",
            captures[^1],
            "--limits",
            profile,
            "--json",
            "-"
        );
        Assert.True(judged is 0 or 1 or 4, judgedErr);
        Valid(analyze, judgedJson, "judged");
        var (pm, pmJson, _) = CliRunner.Run("analyze", fm, "--expect", "pm", "--json", "-");
        Assert.Equal(0, pm);
        Valid(analyze, pmJson, "pm");
        // Over-deviation against FRS: a FAIL.
        string wide = Synth(tmp, "wide", "--kind", "fm", "--deviation", "4000");
        var (fail, failJson, _) = CliRunner.Run(
            "analyze",
            wide,
            "--limits",
            TestData.Repo("profiles", "frs.json"),
            "--json",
            "-"
        );
        Assert.Equal(1, fail);
        Valid(analyze, failJson, "failing");
        string pdf = tmp.File("r.pdf");
        Assert.True(CliRunner.Run("analyze", captures[^1], "--limits", profile, "--report", pdf).Code is 0 or 1 or 4);
        Valid(report, File.ReadAllText(Path.ChangeExtension(pdf, ".json")), "report");
        Assert.True(CliRunner.Run("analyze", fm, "--report", tmp.File("plain.pdf")).Code == 0);
        Valid(report, File.ReadAllText(tmp.File("plain.json")), "report without limits");
        string folder = tmp.File("batch");
        Directory.CreateDirectory(folder);
        foreach (string c in captures.Take(3))
        {
            File.Copy(c, Path.Combine(folder, Path.GetFileName(c)));
            File.Copy(
                Path.ChangeExtension(c, ".sigmf-data"),
                Path.Combine(folder, Path.GetFileNameWithoutExtension(c) + ".sigmf-data")
            );
        }
        File.WriteAllText(Path.Combine(folder, "broken.sigmf-meta"), "{ not json");
        CliRunner.Run("batch", folder, "--out", tmp.File("out"), "--limits", TestData.Repo("profiles", "frs.json"));
        string[] lines = File.ReadAllLines(Path.Combine(tmp.File("out"), "summary.jsonl"));
        Assert.Equal(4, lines.Length);
        foreach (string l in lines)
            Valid(batch, l, "batch record");
    }

    /// <summary>The survey's JSON: its emissions' analyses follow analyze.schema.json and its capture
    /// info.schema.json (both registered by their $id, which the survey schema refers to).</summary>
    [Fact]
    public void Survey_outputs_follow_their_schema()
    {
        using var tmp = new TempDir();
        foreach (string name in new[] { "analyze", "info" })
            SchemaRegistry.Global.Register(Schema(name));
        JsonSchema survey = Schema("survey");
        string band = tmp.File("band.sigmf"),
            quiet = tmp.File("quiet.sigmf");
        string[] common = ["--sample-rate", "100k", "--duration", "1", "--center-frequency", "155M"];
        Assert.Equal(
            0,
            CliRunner
                .Run([
                    "synth",
                    band,
                    "--kind",
                    "fm",
                    "--offset",
                    "-20k",
                    "--snr",
                    "25",
                    .. common,
                    "--also",
                    "fsk:25k:-6:on=0.2-0.6",
                    "--also",
                    "cw:5k:-10",
                ])
                .Code
        );
        Assert.Equal(0, CliRunner.Run(["synth", quiet, "--kind", "noise", .. common]).Code);
        foreach (
            string[] args in new[]
            {
                new[] { band, "--channels", "154.98M:12.5k:4" },
                new[] { band, "--list-only" },
                new[] { quiet },
            }
        )
        {
            var (code, json, err) = CliRunner.Run(["survey", .. args, "--json", "-"]);
            Assert.True(code == 0, err);
            Valid(survey, json, "survey " + string.Join(' ', args.Skip(1)));
        }
    }

    [Fact]
    public void A_key_the_schema_does_not_list_fails()
    {
        JsonSchema info = Schema("info");
        var (_, json, _) = CliRunner.Run("info", TestData.Path("measure", "cw-462.sigmf-meta"), "--json");
        JsonNode node = JsonNode.Parse(json)!;
        node["unlisted"] = 1;
        Assert.False(info.Evaluate(node).IsValid);
        node.AsObject().Remove("unlisted");
        node.AsObject().Remove("sampleRateHz");
        Assert.False(info.Evaluate(node).IsValid);
    }
}
