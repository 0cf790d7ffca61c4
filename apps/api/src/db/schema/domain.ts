// Programs, designs, revisions, studies, review threads and release decisions.
export {};
