namespace IdentityQueue.Cli.Tests;

/// <summary>A fresh temporary folder for a store file and catalogue files, removed when the test ends.</summary>
internal sealed class StoreFolder : IDisposable
{
    public StoreFolder()
    {
        Path = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "idq-cli-tests", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(Path);
    }

    public string Path { get; }

    public string Db => File("store.db");

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public string Write(string name, string text)
    {
        System.IO.File.WriteAllText(File(name), text);
        return File(name);
    }

    public static (int Code, string Out, string Err) Run(params string[] args)
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var code = CliApp.Run(args, output, error);
        return (code, output.ToString(), error.ToString());
    }

    public void Dispose()
    {
        try
        {
            Directory.Delete(Path, recursive: true);
        }
        catch (IOException)
        {
            // Left for the temporary directory's cleaning.
        }
    }
}
