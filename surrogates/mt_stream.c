/* MT19937 as a GSL generator type (mt_stream.h). */
#include "mt_stream.h"

enum { MT_SHIFT = 397 };

/* One step of the twist: the upper bit of a, the lower 31 of b, mixed into c. The constant
 * is masked in, not chosen by a branch. */
static inline uint32_t twist(uint32_t a, uint32_t b, uint32_t c)
{
    uint32_t y = (a & 0x80000000u) | (b & 0x7fffffffu);
    return c ^ (y >> 1) ^ (-(y & 1u) & 0x9908b0dfu);
}

void surrogate_mt_refill(mt_state *s)
{
    uint32_t *w = s->word;
    size_t k = 0;
    for (; k < MT_WORDS - MT_SHIFT; k++)
        w[k] = twist(w[k], w[k + 1], w[k + MT_SHIFT]);
    for (; k < MT_WORDS - 1; k++) /* the words ahead wrap round to the new ones */
        w[k] = twist(w[k], w[k + 1], w[k + MT_SHIFT - MT_WORDS]);
    w[MT_WORDS - 1] = twist(w[MT_WORDS - 1], w[0], w[MT_SHIFT - 1]);
    /* Tempering, as a loop of its own over the block: independent words, which the compiler
     * takes four at a time, instead of a dozen scalar operations inside every draw. */
    for (k = 0; k < MT_WORDS; k++) {
        uint32_t y = w[k];
        y ^= y >> 11;
        y ^= (y << 7) & 0x9d2c5680u;
        y ^= (y << 15) & 0xefc60000u;
        s->out[k] = y ^ (y >> 18);
    }
    s->next = 0;
}

/* The 2002 seeding: Knuth's multiplier 1812433253 (The Art of Computer Programming 2, 3rd
 * ed., p. 106). Only the low 32 bits of the seed count, as in gsl_rng_mt19937. */
static void mt_set(void *state, unsigned long seed)
{
    mt_state *s = state;
    s->word[0] = seed ? (uint32_t)seed : 4357u;
    for (uint32_t i = 1; i < MT_WORDS; i++)
        s->word[i] = 1812433253u * (s->word[i - 1] ^ (s->word[i - 1] >> 30)) + i;
    s->next = MT_WORDS;
}

static unsigned long mt_get(void *state)
{
    gsl_rng rng = {.type = surrogate_mt19937, .state = state};
    return surrogate_mt_next(&rng);
}

static double mt_get_double(void *state)
{
    return mt_get(state) / 4294967296.0;
}

static const gsl_rng_type mt_type = {"slowscan-mt19937", 0xffffffffUL, 0, sizeof(mt_state),
                                     mt_set, mt_get, mt_get_double};
const gsl_rng_type *const surrogate_mt19937 = &mt_type;
