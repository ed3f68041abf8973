using ShuntSweep.Core.Bench;

namespace ShuntSweep.Testing;

/// <summary>Test data that is invented (our own scenario), written once so that tests read as their behaviour.</summary>
public static class Some
{
    /// <summary>A bench file text with an invented two-jack UUT on SIM:: resources; <paramref name="supplyVolts"/> sets the loop supply.</summary>
    public static string BenchYaml(string supplyVolts = "5 V", string fuseA = "500 mA", string fuseB = "10 A") => $$"""
        bench: Test bench T1
        uut:
          manufacturer: Testwright
          model: TW-1 test meter
          serial: TW1-0001
          jacks:
            - name: mA
              fuseRating: {{fuseA}}
            - name: A
              fuseRating: {{fuseB}}
          ranges:
            - name: 60mA
              jack: mA
              fullScale: 60 mA
              resolution: 0.01 mA
              nominalShunt: 1 ohm
              burdenAtFullScale: 200 mV
              accuracy: { reading: 0.5 %, counts: 3 }
            - name: 400mA
              jack: mA
              fullScale: 400 mA
              resolution: 0.1 mA
              nominalShunt: 0.1 ohm
              burdenAtFullScale: 300 mV
            - name: 10A
              jack: A
              fullScale: 10 A
              resolution: 1 mA
              nominalShunt: 10 mohm
              burdenAtFullScale: 400 mV
        supply:
          voltage: {{supplyVolts}}
          currentLimit: 12 A
          maxPower: 150 W
        load:
          minimumVoltage: 1.5 V
          maxCurrent: 30 A
          maxPower: 150 W
        wiring: 20 mohm
        instruments:
          supply: { resource: "SIM::supply" }
          load: { resource: "SIM::load" }
          dropMeter: { resource: "SIM::dmm" }
          uutMeter: { resource: "SIM::uut" }
        """;

    /// <summary>Writes <paramref name="text"/> to a new temporary file with the given extension and returns its path.</summary>
    public static string TempFile(string text, string extension = ".yaml")
    {
        var path = Path.Combine(Path.GetTempPath(), "shuntsweep-tests", Guid.NewGuid().ToString("N") + extension);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        File.WriteAllText(path, text);
        return path;
    }

    /// <summary>A new empty temporary directory.</summary>
    public static string TempDirectory()
    {
        var path = Path.Combine(Path.GetTempPath(), "shuntsweep-tests", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(path);
        return path;
    }

    /// <summary>The bench of <see cref="BenchYaml"/>, loaded.</summary>
    public static BenchDescription Bench(string supplyVolts = "5 V", string fuseA = "500 mA") =>
        BenchReader.Load(TempFile(BenchYaml(supplyVolts, fuseA)));
}
