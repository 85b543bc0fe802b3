"""Training pipeline: word lists + prose corpus + misspellings -> model file.

Steps (each reported with its counts in the model header):
1. lexicon from word lists (SCOWL), each form marked en-US / en-GB;
2. corpus pass: tokenize prose with the same tokenizer the checker uses;
   admit frequent corpus words that are not near-misses of listed words;
3. unigram prior = blend of general word frequencies and corpus counts;
4. trigram Kneser-Ney language model over the lexicon's keys (and <code>);
5. error model from aligned misspelling pairs (train split only): single-letter
   edits in context and multi-character rules;
6. indexes: deletion neighbourhood, real-word neighbours, sound keys.

Inputs are plain files so the build is reproducible from named sources
(see models/README.md); general word frequencies are an optional callable
so the pipeline also runs, smaller, in tests without extra packages.
"""

from __future__ import annotations

import time
from array import array
from collections import Counter, defaultdict
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path
from typing import Callable, Iterator, Sequence

from calami.model import SPECIAL_UNITS, Model, Params
from calami.model.candidates import CandidateIndex
from calami.model.channel import ChannelModel, text_char_counts, train_channel
from calami.model.confusables import confusion_pairs
from calami.model.language import NgramCounter, build_language_model
from calami.model.lexicon import CORPUS, GB, LOWER, OTHER, US, Lexicon
from calami.model.novel import NovelWordModel
from calami.model.phonetic import sound_key
from calami.text.tokens import CODE, SKIP, UNK, lm_units, sentences, tokenize

# SCOWL list families we read, and the variant bits they grant.
SCOWL_FAMILIES = {
    "english": US | GB,
    "american": US,
    "british": GB,
    "british_z": GB,
    "canadian": 0,  # not read: en-CA is neither target variant
    "variant_1": OTHER,  # alternative spellings: right unless a variant is asked for
}
SCOWL_KINDS = ("words", "upper", "proper-names", "contractions", "abbreviations")


@dataclass
class BuildConfig:
    scowl_dir: Path | None = None
    scowl_max_size: int = 70
    extra_words: list[tuple[str, int]] = field(default_factory=list)  # (form, variant bits)
    corpus_files: list[Path] = field(default_factory=list)
    corpus_lines: list[str] = field(default_factory=list)  # in-memory corpus (tests)
    pairs: list[tuple[str, str]] = field(default_factory=list)
    general_frequency: Callable[[str], float] | None = None
    admit_min_count: int = 20
    admit_min_sources: int = 2
    lm_min_count2: int = 2  # bigrams stored when they follow at least this many distinct words
    lm_min_count3: int = 2  # trigrams stored when seen at least this often
    lm_lam: float = 0.3
    prior_blend: float = 0.5  # weight of general frequencies vs corpus counts
    realword_top: int = 40000  # real-word checks among the most frequent keys
    realword_max_neighbours: int = 12
    sound_top: int = 80000
    params: Params = field(default_factory=Params)
    jobs: int = 1  # worker processes for the corpus pass
    log: Callable[[str], None] = lambda msg: None


# ------------------------------------------------------------------ lexicon


# "'s" forms that are "is"/"has", not possessives: they stay words of their own.
# The word lists mix them in with possessives; this list is common knowledge.
CONTRACTIONS = frozenset({"it's", "that's", "there's", "here's", "he's", "she's", "what's", "who's",
                          "where's", "let's", "how's", "when's", "why's"})


def read_scowl(scowl_dir: Path, max_size: int) -> dict[str, int]:
    """Surface form -> variant bits, from the SCOWL list files up to ``max_size``."""
    forms: dict[str, int] = defaultdict(int)
    for path in sorted(scowl_dir.iterdir()):
        name, _, size = path.name.rpartition(".")
        if not size.isdigit() or int(size) > max_size:
            continue
        family, _, kind = name.partition("-")
        bits = SCOWL_FAMILIES.get(family)
        if not bits or kind not in SCOWL_KINDS:
            continue
        with open(path, encoding="utf-8", errors="replace") as fh:
            for line in fh:
                word = line.strip()
                if word and "\ufffd" not in word:
                    forms[word] |= bits
    return forms


def lexicon_from_forms(forms: dict[str, int]) -> tuple[list[str], bytearray, list[str]]:
    """Keys (lower case, sorted), their flags, and the cased forms."""
    flags: dict[str, int] = defaultdict(int)
    cased: set[str] = set()
    for form, bits in forms.items():
        if form.endswith("'s") and form[:-2] in forms and form not in CONTRACTIONS:
            continue  # possessives are derived at lookup time
        key = form.lower()
        if "\n" in key or not key:
            continue
        flags[key] |= bits
        if form == key:
            flags[key] |= LOWER
        else:
            cased.add(form)
    keys = sorted(flags)
    return keys, bytearray(flags[k] for k in keys), sorted(cased)


# ------------------------------------------------------------------- corpus


def corpus_paragraphs(cfg: BuildConfig) -> Iterator[tuple[str, str]]:
    """(source name, paragraph) for every corpus line."""
    for line in cfg.corpus_lines:
        yield "memory", line
    for path in cfg.corpus_files:
        with open(path, encoding="utf-8", errors="replace") as fh:
            for line in fh:
                line = line.strip()
                if line:
                    yield path.stem, line


@dataclass
class CorpusCounts:
    sentences: list[list[str]]
    units: Counter[str]
    sources: dict[str, set[str]]
    surface: dict[str, Counter[str]]
    tokens: int


def _tokenize_chunk(packed: bytes) -> bytes:
    """Worker: paragraphs -> LM sentences, surface forms, keys seen per source (msgpack in and out)."""
    import msgpack

    out_sents: list[list[str]] = []
    surface: Counter[tuple[str, str]] = Counter()
    seen: dict[str, set[str]] = defaultdict(set)
    for source, para in msgpack.unpackb(packed):
        for sent in sentences(tokenize(para)):
            seq = lm_units(sent)
            if all(u == UNK or u == CODE for u in seq):
                continue
            out_sents.append(seq)
            keys = seen[source]
            for tok in sent:
                if tok.kind != SKIP:
                    key = tok.norm.lower()
                    keys.add(key)
                    if tok.text != key:
                        surface[key, tok.norm] += 1
    return msgpack.packb([out_sents, [[k, f, c] for (k, f), c in surface.items()],
                          {src: sorted(keys) for src, keys in seen.items()}])


def _chunks(cfg: BuildConfig, size: int = 4000) -> Iterator[bytes]:
    import msgpack

    chunk: list[tuple[str, str]] = []
    for item in corpus_paragraphs(cfg):
        chunk.append(item)
        if len(chunk) >= size:
            yield msgpack.packb(chunk)
            chunk = []
    if chunk:
        yield msgpack.packb(chunk)


def read_corpus(cfg: BuildConfig) -> CorpusCounts:
    """Tokenize the corpus (in ``cfg.jobs`` forked workers; tasks and results cross as msgpack bytes)."""
    import msgpack

    intern: dict[str, str] = {}
    units: Counter[str] = Counter()
    sources: dict[str, set[str]] = defaultdict(set)
    surface: dict[str, Counter[str]] = defaultdict(Counter)
    out: list[list[str]] = []
    tokens = 0
    pool = None
    if cfg.jobs > 1:
        import multiprocessing

        pool = multiprocessing.get_context("fork").Pool(cfg.jobs)
        results = pool.imap(_tokenize_chunk, _chunks(cfg), chunksize=1)
    else:
        results = map(_tokenize_chunk, _chunks(cfg))
    try:
        for n, packed in enumerate(results):
            sents, forms, seen = msgpack.unpackb(packed)
            for seq in sents:
                seq = [intern.setdefault(u, u) for u in seq]
                out.append(seq)
                tokens += len(seq)
                units.update(seq)
            for key, form, count in forms:
                surface[key][form] += count
            for source, keys in seen.items():
                for key in keys:
                    if len(sources[key]) < 3:
                        sources[key].add(source)
            if n % 50 == 0 and n:
                cfg.log(f"  corpus: {tokens} tokens")
    finally:
        if pool is not None:
            pool.close()
            pool.join()
    return CorpusCounts(out, units, sources, surface, tokens)


def admit_corpus_words(
    keys: set[str], corpus: CorpusCounts, cfg: BuildConfig, frequency: Callable[[str], float]
) -> dict[str, str | None]:
    """Frequent corpus words missing from the lists: key -> cased form (or None = lower case).

    A word is admitted only if it is frequent in several sources and is not a
    near-miss of a listed word that is far more frequent (a common typo in
    edited text would otherwise become 'correct').
    """
    index = CandidateIndex.build(sorted(keys))
    key_list = index.keys
    admitted: dict[str, str | None] = {}
    for word, count in corpus.units.items():
        if count < cfg.admit_min_count or word in keys or word.startswith("<"):
            continue
        if len(word) < 3 or not word.replace("'", "").isalpha() or word.endswith(("'s", "'")):
            continue
        if len(corpus.sources.get(word, ())) < cfg.admit_min_sources:
            continue
        near = index.within(word, 1)
        if any(corpus.units.get(key_list[k], 0) >= 50 * count or frequency(key_list[k]) >= 50 * max(frequency(word), 1e-9)
               for k in near):
            continue
        forms = corpus.surface.get(word, Counter())
        lower_count = count - sum(forms.values())
        if forms and lower_count < 0.1 * count:
            admitted[word] = forms.most_common(1)[0][0]
        else:
            admitted[word] = None
    return admitted


# -------------------------------------------------------------------- build


def build(cfg: BuildConfig) -> tuple[Model, dict]:
    """Run the pipeline; returns the model and the header describing it."""
    t0 = time.time()
    log = cfg.log
    forms: dict[str, int] = defaultdict(int)
    if cfg.scowl_dir:
        forms.update(read_scowl(cfg.scowl_dir, cfg.scowl_max_size))
    for form, bits in cfg.extra_words:
        forms[form] |= bits
    list_keys, _, _ = lexicon_from_forms(forms)
    log(f"word lists: {len(forms)} forms, {len(list_keys)} keys")

    general = cfg.general_frequency or (lambda w: 0.0)
    corpus = read_corpus(cfg)
    log(f"corpus: {corpus.tokens} tokens in {len(corpus.sentences)} sentences")

    admitted = admit_corpus_words(set(list_keys), corpus, cfg, general)
    for word, cased in admitted.items():
        forms[cased or word] |= US | GB
    keys, flags, cased_forms = lexicon_from_forms(forms)
    key_pos = {k: i for i, k in enumerate(keys)}
    for word in admitted:
        if word in key_pos:
            flags[key_pos[word]] |= CORPUS
    lexicon = Lexicon(keys, flags, cased_forms)
    log(f"lexicon: {len(keys)} keys ({len(admitted)} admitted from the corpus), {len(cased_forms)} cased forms")

    # Unigram prior over LM ids (keys, then <s>, </s>, <unk>, <code>).
    V = len(keys) + SPECIAL_UNITS
    bos, eos, unk, code = len(keys), len(keys) + 1, len(keys) + 2, len(keys) + 3
    corpus_total = sum(corpus.units.values()) or 1
    gen = [general(k) for k in keys]
    gen_total = sum(gen) or 1.0
    floor = 1e-9
    blend = cfg.prior_blend if cfg.general_frequency else 0.0
    prior = [blend * g / gen_total + (1 - blend) * corpus.units.get(k, 0) / corpus_total + floor
             for k, g in zip(keys, gen)]
    prior += [0.0, len(corpus.sentences) / corpus_total, corpus.units.get(UNK, 0) / corpus_total + floor,
              corpus.units.get(CODE, 0) / corpus_total + floor]

    counter = NgramCounter(V, bos, eos)
    special = {UNK: unk, CODE: code}
    for sent in corpus.sentences:
        counter.add_sentence([key_pos.get(u, unk) if u not in special else special[u] for u in sent])
    corpus.sentences.clear()  # the counter holds them as ids now
    counts = counter.counts()
    lm = build_language_model(counts, prior, lam=cfg.lm_lam, min_count2=cfg.lm_min_count2, min_count3=cfg.lm_min_count3)
    lm_sizes = lm.sizes()
    log(f"language model: {counts.trigram_types} trigram types, {lm_sizes['trigrams_stored']} stored "
        f"(count >= {cfg.lm_min_count3}) in {lm_sizes['trigram_contexts']} contexts; {lm_sizes['bigrams_stored']} bigrams "
        f"stored (continuation count >= {cfg.lm_min_count2}); D2 = {lm.d2:.3f}, D3 = {lm.d3:.3f}")

    channel = error_model_trainer(keys, prior)(cfg.pairs)
    by_prior = sorted(range(len(keys)), key=lambda k: -prior[k])
    log(f"error model: {len(cfg.pairs)} pairs; P(k edits) = {[round(x, 3) for x in channel.edits_k]}; "
        f"{len(channel.rules)} multi-character rules")

    candidates = CandidateIndex.build(keys)
    log(f"candidate index: {candidates.stats()}")

    neighbours_start, neighbours = realword_neighbours(keys, prior, by_prior[: cfg.realword_top], candidates, cfg)
    log(f"real-word neighbours: {len(neighbours)} links")

    sound_index: dict[str, list[int]] = defaultdict(list)
    for k in by_prior[: cfg.sound_top]:
        if lexicon.flags[k] & LOWER and len(keys[k]) >= 3:
            sound_index[sound_key(keys[k])].append(k)
    model = Model(
        lexicon=lexicon, lm=lm, channel=channel, candidates=candidates,
        neighbours_start=neighbours_start, neighbours=neighbours,
        sound_index={s: tuple(ids) for s, ids in sound_index.items()},
        novel=train_novel_model(keys, prior, corpus, key_pos), params=cfg.params,
    )
    header = {
        "built": datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
        "build_seconds": round(time.time() - t0, 1),
        "counts": {
            "word_list_forms": len(forms), "keys": len(keys), "admitted_from_corpus": len(admitted),
            "cased_forms": len(cased_forms), "corpus_tokens": corpus.tokens, "corpus_sentences": counter.sentences,
            "bigram_types": counts.bigram_types, "trigram_types": counts.trigram_types, **lm_sizes,
            "pairs": len(cfg.pairs),
            "candidate_entries": candidates.stats()["entries"], "realword_links": len(neighbours),
            "sound_keys": len(sound_index), "error_rules": len(channel.rules),
        },
        "settings": {
            "scowl_max_size": cfg.scowl_max_size, "lm_order": 3, "lm_min_count2": cfg.lm_min_count2,
            "lm_min_count3": cfg.lm_min_count3, "lm_lam": cfg.lm_lam, "prior_blend": blend,
            "discount_bigram": lm.d2, "discount_trigram": lm.d3,
        },
    }
    return model, header


def train_novel_model(keys: Sequence[str], prior: Sequence[float], corpus: CorpusCounts, key_pos: dict[str, int]) -> NovelWordModel:
    """Character model of what *new* words look like in technical prose.

    Half of its mass comes from the corpus words that are not in the lexicon
    (mostly jargon and abbreviations: "dtype", "varint", "kubectl"), half
    from the lexicon weighted by frequency.  A typo of an English word looks
    English, so the jargon half lets the model tell the two apart.
    """
    jargon = [(w, c) for w, c in corpus.units.items()
              if w not in key_pos and not w.startswith("<") and w.replace("'", "").isalpha() and len(w) >= 2]
    jargon_total = sum(c for _, c in jargon) or 1
    words = [(k, p) for k, p in zip(keys, prior[: len(keys)])]
    lexicon_total = sum(p for _, p in words) or 1.0
    mixed = [(w, 0.5 * p / lexicon_total) for w, p in words] + [(w, 0.5 * c / jargon_total) for w, c in jargon]
    return NovelWordModel.train(mixed)


def error_model_trainer(keys: Sequence[str], prior: Sequence[float]) -> Callable[[Sequence[tuple[str, str]]], ChannelModel]:
    """Train error models on any set of pairs against this lexicon's text statistics.

    Character counts come from the keys weighted by frequency; the 5,000 most
    frequent keys set the reference scale of error rates.
    """
    chars, char_pairs = text_char_counts(zip(keys, prior))
    top = sorted(range(len(keys)), key=lambda k: -prior[k])[:5000]
    reference = [(keys[k], prior[k]) for k in top]
    words = list(zip(keys, prior))
    return lambda pairs: train_channel(pairs, chars, char_pairs, reference_words=reference, rule_words=words)


def realword_neighbours(
    keys: Sequence[str], prior: Sequence[float], frequent: Sequence[int], index: CandidateIndex, cfg: BuildConfig
) -> tuple[array, array]:
    """For each frequent key: frequent keys one edit away, plus confusion-set partners."""
    frequent_set = set(frequent)
    key_pos = {k: i for i, k in enumerate(keys)}
    extra: dict[int, set[int]] = defaultdict(set)
    for typed, intended in confusion_pairs():
        a, b = key_pos.get(typed), key_pos.get(intended)
        if a is not None and b is not None:
            extra[a].add(b)
    start = array("I", [0])
    ids = array("I")
    for k in range(len(keys)):
        near: set[int] = set(extra.get(k, ()))
        if k in frequent_set and len(keys[k]) >= 2:
            for c, d in index.within(keys[k], 1).items():
                if c != k and c in frequent_set and d == 1 and not inflections(keys[k], keys[c]):
                    near.add(c)
        ranked = sorted(near, key=lambda c: -prior[c])[: cfg.realword_max_neighbours]
        ids.extend(sorted(ranked))
        start.append(len(ids))
    return start, ids


_ENDINGS = ("s", "es", "d", "ed", "r", "er", "ly", "ing", "'s", "n", "en", "st", "est", "y")


def inflections(a: str, b: str) -> bool:
    """True if one word is the other plus a common ending ("user"/"users").

    Choosing between such forms is grammar, not spelling: a bigram model
    flags them too eagerly, so they are not real-word neighbours.
    """
    if len(a) == len(b) > 2 and a[:-1] == b[:-1] and a[-1] in "sdry" and b[-1] in "sdry":
        return True  # specifies/specified, users/usery
    short, long_ = (a, b) if len(a) <= len(b) else (b, a)
    if long_.startswith(short) and long_[len(short):] in _ENDINGS:
        return True
    # describe/described, replace/replaces: a final "e" absorbed by the ending
    if short.endswith("e") and long_.startswith(short[:-1]) and long_[len(short) - 1:] in ("ed", "es", "er", "ing", "en", "y"):
        return True
    return False


def wordfreq_frequency() -> Callable[[str], float]:
    """General English frequencies from the ``wordfreq`` package (build time only)."""
    try:
        from wordfreq import word_frequency
    except ImportError as exc:  # pragma: no cover - depends on the build extra
        from calami.errors import CalamiError

        raise CalamiError("building the model needs the 'build' extra: pip install 'calami[build]'") from exc
    return lambda w: word_frequency(w, "en")
