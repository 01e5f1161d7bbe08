export async function runTeletrafficBench(): Promise<void> {}
