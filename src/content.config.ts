// Content collections over the same content tree `kiln build` reads, validated by the same zod
// schemas (generators/content/schema.ts; Astro and Kiln share one zod 3 instance). Pages take
// their numbers from the build's JSON; these collections give them the documents as written.
// The entry id is the directory name (instrument id, release semver).
import { defineCollection } from 'astro:content';
import { glob } from 'astro/loaders';
import { instrumentSchema, releaseSchema } from '../generators/content/schema.ts';

const byDirectory = ({ entry }: { entry: string }) => entry.split('/')[0];

export const collections = {
  instruments: defineCollection({
    loader: glob({ pattern: '*/instrument.yaml', base: './content/instruments', generateId: byDirectory }),
    schema: instrumentSchema,
  }),
  releases: defineCollection({
    loader: glob({ pattern: '*/release.yaml', base: './content/releases', generateId: byDirectory }),
    schema: releaseSchema,
  }),
  releaseNotes: defineCollection({
    loader: glob({ pattern: '*/notes.md', base: './content/releases', generateId: byDirectory }),
  }),
};
