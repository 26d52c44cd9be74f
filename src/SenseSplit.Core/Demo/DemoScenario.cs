namespace SenseSplit.Core.Demo;

/// <summary>A topic of the demo's discourse model: its content words, most frequent first.</summary>
public sealed record DemoTopic(string Id, string Domain, string[] Words);

/// <summary>One planted sense of a term: the topic it appears in and its share relative to the term's other senses.</summary>
public sealed record DemoSense(string Topic, double Share);

public sealed record DemoTerm(string Term, DemoSense[] Senses)
{
    public bool IsPolysemous => Senses.Length > 1;
}

public sealed record DemoGlossaryEntry(string Term, string Owner);

/// <summary>The invented setting that drives the demo corpus: function words, topics, planted terms, glossary.</summary>
public sealed record DemoScenario(string Name, string About, string[] FunctionWords, DemoTopic[] Topics, DemoTerm[] Terms, DemoGlossaryEntry[] Glossary);
