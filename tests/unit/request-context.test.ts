// sharedRead: the loaders of one GET request share a read; a request that may write, another
// request, or code running outside any request each read for themselves.
import { expect, it } from "vitest";
import { requestFacts, sharedRead } from "~/.server/request-context";

const request = (method: string) => new Request("http://127.0.0.1/trials/t", { method });

function counter() {
  let reads = 0;
  return { read: async () => ++reads, reads: () => reads };
}

it("reads once for the loaders of one GET request", async () => {
  const c = counter();
  const get = request("GET");
  const results = await requestFacts.run({ userId: null }, () =>
    Promise.all([sharedRead(get, "user", c.read), sharedRead(get, "user", c.read), sharedRead(get, "user", c.read)]),
  );
  expect(results).toEqual([1, 1, 1]);
  expect(c.reads()).toBe(1);
  // Another key is another read.
  await requestFacts.run({ userId: null }, () => Promise.all([sharedRead(get, "a", c.read), sharedRead(get, "b", c.read)]));
  expect(c.reads()).toBe(3);
});

it("reads again in a POST, in another request and outside any request", async () => {
  const c = counter();
  const post = request("POST");
  await requestFacts.run({ userId: null }, async () => {
    await sharedRead(post, "user", c.read);
    await sharedRead(post, "user", c.read);
  });
  expect(c.reads()).toBe(2);
  const get = request("GET");
  await requestFacts.run({ userId: null }, () => sharedRead(get, "user", c.read));
  await requestFacts.run({ userId: null }, () => sharedRead(get, "user", c.read));
  expect(c.reads()).toBe(4);
  await sharedRead(get, "user", c.read);
  await sharedRead(get, "user", c.read);
  expect(c.reads()).toBe(6);
});

it("gives every loader the same refusal when the shared read fails", async () => {
  const get = request("GET");
  let reads = 0;
  const refuse = async () => {
    reads++;
    throw new Error("signed out");
  };
  await requestFacts.run({ userId: null }, async () => {
    await expect(sharedRead(get, "user", refuse)).rejects.toThrow("signed out");
    await expect(sharedRead(get, "user", refuse)).rejects.toThrow("signed out");
  });
  expect(reads).toBe(1);
});
