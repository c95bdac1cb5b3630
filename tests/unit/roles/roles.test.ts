// What an API token may do is bounded by two roles at once: the one it was made with and the one its
// owner holds now. These checks follow the role table of shared/roles.ts.
import { describe, expect, it } from "vitest";
import { roleCovers, sharedRole, STUDY_ROLES } from "../../../shared/roles";

describe("roleCovers", () => {
  it("lets the study lead cover every role and every role cover the guest", () => {
    for (const r of STUDY_ROLES) {
      expect(roleCovers("owner", r)).toBe(true);
      expect(roleCovers(r, "viewer")).toBe(true);
    }
  });
  it("keeps coder and analyst apart: neither may do all the other may", () => {
    expect(roleCovers("coder", "analyst")).toBe(false);
    expect(roleCovers("analyst", "coder")).toBe(false);
    expect(roleCovers("coder", "reviewer")).toBe(true);
    expect(roleCovers("reviewer", "coder")).toBe(false);
  });
});

describe("sharedRole", () => {
  it("is the narrower role when one covers the other", () => {
    expect(sharedRole("owner", "coder")).toBe("coder");
    expect(sharedRole("analyst", "owner")).toBe("analyst");
    expect(sharedRole("viewer", "owner")).toBe("viewer");
  });
  it("falls to the reviewer's rights (read and post) between coder and analyst", () => {
    expect(sharedRole("coder", "analyst")).toBe("reviewer");
  });
});
