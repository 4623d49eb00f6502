/* The Mersenne Twister MT19937 (Matsumoto & Nishimura 1998, ACM Transactions on Modeling and
 * Computer Simulation 8:3-30) with its 2002 seeding, as a GSL generator type whose stream is
 * gsl_rng_mt19937's, word for word, for every seed (seed 0 means 4357, as there); suite
 * surrogates compares the two.
 *
 * Why our own: the surrogate draws spend a fifth of the standard job in the generator. GSL's
 * picks the twist constant with a branch on each word's low bit, a coin toss the processor
 * guesses wrong half the time, and is reached through a function pointer per word. Here the
 * twist is branch-free and the phase draw takes words inline (surrogate_mt_next). Every
 * GSL draw (gsl_rng_uniform, gsl_ran_gaussian, ...) works on it unchanged. */
#ifndef SLOWSCAN_MT_STREAM_H
#define SLOWSCAN_MT_STREAM_H

#include <gsl/gsl_rng.h>

#include <stddef.h>
#include <stdint.h>

enum { MT_WORDS = 624 };

typedef struct {
    uint32_t word[MT_WORDS];
    uint32_t out[MT_WORDS]; /* the block's outputs: word[] tempered, all at once at refill */
    size_t next;            /* MT_WORDS: the block is used up */
} mt_state;

/* The generator type: gsl_rng_alloc(surrogate_mt19937). */
extern const gsl_rng_type *const surrogate_mt19937;

/* The next block of MT_WORDS words, and their outputs. */
void surrogate_mt_refill(mt_state *s);

/* The next 32-bit output of the generator behind rng (whose type is surrogate_mt19937). */
static inline uint32_t surrogate_mt_next(gsl_rng *rng)
{
    mt_state *s = rng->state;
    if (s->next == MT_WORDS)
        surrogate_mt_refill(s);
    return s->out[s->next++];
}

#endif
