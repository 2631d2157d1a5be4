// Content collections over the same content tree `kiln build` reads, validated by the same zod
// schemas (generators/content/schema.ts; Astro and Kiln share one zod 3 instance). Pages take
// their numbers from the build's JSON; these collections give them the documents as written.
// The entry id is the directory name (instrument id, release semver). The tree is KILN_CONTENT
// (set by `kiln site --content DIR`), else ./content of the project.
import { defineCollection } from 'astro:content';
import { glob } from 'astro/loaders';
import { instrumentSchema, releaseSchema } from '../generators/content/schema.ts';

const CONTENT = (process.env.KILN_CONTENT ?? './content').replace(/\/+$/, '');

const byDirectory = ({ entry }: { entry: string }) => entry.split('/')[0];

export const collections = {
  instruments: defineCollection({
    loader: glob({ pattern: '*/instrument.yaml', base: `${CONTENT}/instruments`, generateId: byDirectory }),
    schema: instrumentSchema,
  }),
  releases: defineCollection({
    loader: glob({ pattern: '*/release.yaml', base: `${CONTENT}/releases`, generateId: byDirectory }),
    schema: releaseSchema,
  }),
  releaseNotes: defineCollection({
    loader: glob({ pattern: '*/notes.md', base: `${CONTENT}/releases`, generateId: byDirectory }),
  }),
};
