export async function runSimulationBench(): Promise<void> {}
