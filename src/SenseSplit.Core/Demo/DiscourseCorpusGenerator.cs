using System.Text;

namespace SenseSplit.Core.Demo;

/// <summary>Settings of the demo corpus generator.</summary>
public sealed record DiscourseSettings
{
    public long Tokens { get; init; } = 3_000_000;
    public int Seed { get; init; } = 7;
    /// <summary>Invented low-frequency words appended to each topic's list, for a realistic Zipf tail.</summary>
    public int TailWordsPerTopic { get; init; } = 120;
    /// <summary>Zipf exponent of word frequencies within a topic (about 1 for natural text, common practice).</summary>
    public double ZipfExponent { get; init; } = 1.05;
    /// <summary>Probability that a slot holds a function word.</summary>
    public double FunctionWordRate { get; init; } = 0.42;
    /// <summary>Rate of a term's most frequent sense among its topic's content words.</summary>
    public double TermRate { get; init; } = 0.012;
}

/// <summary>How often each planted sense of a term was actually written.</summary>
public sealed record PlantedCount(string Term, string Topic, double Share, long Occurrences);

/// <summary>
/// Generates text from a slowly drifting mixture of topics. A document starts on a primary topic with a little of a
/// second one; after every sentence the mixture takes a small random step (a discrete form of the random-walk
/// discourse model of Arora, Li, Liang, Ma & Risteski 2016, "A latent variable model approach to PMI-based word
/// embeddings", TACL 4). Each sentence draws its topic from the mixture; each slot is a function word or a content word
/// drawn from the topic's Zipf distribution. Planted terms replace content words of their sense topics at rates set by
/// their shares, so a term with shares 10:1 is written ten times as often in its first topic as in its second.
/// </summary>
public sealed class DiscourseCorpusGenerator
{
    private readonly DemoScenario _scenario;
    private readonly DiscourseSettings _settings;
    private readonly string[][] _topicWords;
    private readonly double[][] _topicCdf;
    private readonly double[] _functionCdf;
    // Per topic: the planted terms written in it and the probability that a content slot holds each.
    private readonly (int term, double rate)[][] _plantedByTopic;
    private readonly long[,] _planted;

    public DiscourseCorpusGenerator(DemoScenario scenario, DiscourseSettings settings)
    {
        ArgumentNullException.ThrowIfNull(scenario);
        ArgumentNullException.ThrowIfNull(settings);
        if (scenario.Topics.Length < 2) throw new ArgumentException($"the scenario needs at least 2 topics (has {scenario.Topics.Length})");
        if (settings.Tokens <= 0) throw new ArgumentOutOfRangeException(nameof(settings), $"tokens ({settings.Tokens}) must be positive");
        _scenario = scenario;
        _settings = settings;
        var topicIndex = scenario.Topics.Select((t, i) => (t.Id, i)).ToDictionary(p => p.Id, p => p.i, StringComparer.Ordinal);
        var termWords = new HashSet<string>(scenario.Terms.Select(t => t.Term), StringComparer.Ordinal);
        var tailRandom = new Random(settings.Seed ^ 0x5eed);
        var used = new HashSet<string>(scenario.Topics.SelectMany(t => t.Words).Concat(scenario.FunctionWords), StringComparer.Ordinal);
        _topicWords = new string[scenario.Topics.Length][];
        _topicCdf = new double[scenario.Topics.Length][];
        for (int t = 0; t < scenario.Topics.Length; t++)
        {
            // Terms are written only through their planted rates, never as ordinary topic words.
            var words = scenario.Topics[t].Words.Where(w => !termWords.Contains(w)).ToList();
            for (int i = 0; i < settings.TailWordsPerTopic; i++) words.Add(InventWord(tailRandom, used));
            _topicWords[t] = words.ToArray();
            _topicCdf[t] = ZipfCdf(words.Count, settings.ZipfExponent);
        }
        _functionCdf = ZipfCdf(scenario.FunctionWords.Length, settings.ZipfExponent);
        var planted = new List<(int term, double rate)>[scenario.Topics.Length];
        for (int t = 0; t < planted.Length; t++) planted[t] = [];
        for (int j = 0; j < scenario.Terms.Length; j++)
        {
            var term = scenario.Terms[j];
            double max = term.Senses.Max(s => s.Share);
            foreach (var sense in term.Senses)
            {
                if (!topicIndex.TryGetValue(sense.Topic, out int t))
                    throw new ArgumentException($"term '{term.Term}' names an unknown topic '{sense.Topic}'");
                planted[t].Add((j, settings.TermRate * sense.Share / max));
            }
        }
        _plantedByTopic = planted.Select(p => p.ToArray()).ToArray();
        _planted = new long[scenario.Terms.Length, scenario.Topics.Length];
    }

    /// <summary>Counts of every planted sense written so far (complete once <see cref="Lines"/> has been enumerated).</summary>
    public IReadOnlyList<PlantedCount> PlantedCounts()
    {
        var list = new List<PlantedCount>();
        var topicIndex = _scenario.Topics.Select((t, i) => (t.Id, i)).ToDictionary(p => p.Id, p => p.i, StringComparer.Ordinal);
        for (int j = 0; j < _scenario.Terms.Length; j++)
            foreach (var s in _scenario.Terms[j].Senses)
                list.Add(new PlantedCount(_scenario.Terms[j].Term, s.Topic, s.Share, _planted[j, topicIndex[s.Topic]]));
        return list;
    }

    /// <summary>The words of topic <paramref name="topic"/>, most frequent first, including the invented tail.</summary>
    public IReadOnlyList<string> TopicWords(int topic) => _topicWords[topic];

    /// <summary>The corpus, one sentence per line, an empty line between documents.</summary>
    public IEnumerable<string> Lines()
    {
        var rng = new Random(_settings.Seed);
        int topics = _scenario.Topics.Length;
        var mixture = new double[topics];
        var sb = new StringBuilder(256);
        long written = 0;
        while (written < _settings.Tokens)
        {
            // A document: a primary topic, a secondary one of the same domain when there is one.
            int primary = rng.Next(topics);
            var sameDomain = Enumerable.Range(0, topics).Where(t => t != primary && _scenario.Topics[t].Domain == _scenario.Topics[primary].Domain).ToArray();
            int secondary = sameDomain.Length > 0 && rng.NextDouble() < 0.7 ? sameDomain[rng.Next(sameDomain.Length)] : rng.Next(topics);
            Array.Fill(mixture, 0.02 / topics);
            mixture[primary] += 0.78;
            mixture[secondary] += 0.2;
            int sentences = 8 + rng.Next(25);
            for (int s = 0; s < sentences && written < _settings.Tokens; s++)
            {
                int topic = Sample(mixture, rng);
                int length = 6 + rng.Next(13);
                sb.Clear();
                for (int i = 0; i < length; i++)
                {
                    if (i > 0) sb.Append(' ');
                    sb.Append(NextWord(topic, rng));
                }
                written += length;
                yield return sb.ToString();
                Drift(mixture, rng);
            }
            yield return "";
        }
    }

    private string NextWord(int topic, Random rng)
    {
        if (rng.NextDouble() < _settings.FunctionWordRate)
            return _scenario.FunctionWords[SampleCdf(_functionCdf, rng)];
        // One content slot in ten is drawn from a random topic: the background chatter of real documents.
        if (rng.NextDouble() < 0.1) topic = rng.Next(_topicWords.Length);
        double u = rng.NextDouble();
        foreach (var (term, rate) in _plantedByTopic[topic])
        {
            if (u < rate)
            {
                _planted[term, topic]++;
                return _scenario.Terms[term].Term;
            }
            u -= rate;
        }
        return _topicWords[topic][SampleCdf(_topicCdf[topic], rng)];
    }

    /// <summary>A small multiplicative random step, renormalised: the mixture wanders slowly.</summary>
    private static void Drift(double[] mixture, Random rng)
    {
        double sum = 0;
        for (int t = 0; t < mixture.Length; t++)
        {
            mixture[t] *= Math.Exp(0.15 * (rng.NextDouble() * 2 - 1));
            sum += mixture[t];
        }
        for (int t = 0; t < mixture.Length; t++) mixture[t] /= sum;
    }

    private static int Sample(double[] p, Random rng)
    {
        double u = rng.NextDouble();
        for (int i = 0; i < p.Length - 1; i++)
        {
            if (u < p[i]) return i;
            u -= p[i];
        }
        return p.Length - 1;
    }

    private static int SampleCdf(double[] cdf, Random rng)
    {
        int i = Array.BinarySearch(cdf, rng.NextDouble());
        if (i < 0) i = ~i;
        return Math.Min(i, cdf.Length - 1);
    }

    private static double[] ZipfCdf(int n, double exponent)
    {
        var cdf = new double[n];
        double sum = 0;
        for (int r = 0; r < n; r++) { sum += 1.0 / Math.Pow(r + 2, exponent); cdf[r] = sum; }
        for (int r = 0; r < n; r++) cdf[r] /= sum;
        return cdf;
    }

    private static readonly string[] Onsets = ["b", "br", "d", "dr", "f", "g", "gl", "k", "l", "m", "n", "p", "pl", "r", "s", "st", "t", "tr", "v", "w", "z"];
    private static readonly string[] Vowels = ["a", "e", "i", "o", "u", "ai", "ou", "ee"];
    private static readonly string[] Codas = ["", "n", "l", "r", "sk", "nd", "m", "t", "x", "ck"];

    /// <summary>A pronounceable invented word of two or three syllables that is not already in use.</summary>
    private static string InventWord(Random rng, HashSet<string> used)
    {
        while (true)
        {
            int syllables = 2 + rng.Next(2);
            var sb = new StringBuilder();
            for (int s = 0; s < syllables; s++)
                sb.Append(Onsets[rng.Next(Onsets.Length)]).Append(Vowels[rng.Next(Vowels.Length)]);
            sb.Append(Codas[rng.Next(Codas.Length)]);
            string word = sb.ToString();
            if (used.Add(word)) return word;
        }
    }
}
